import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { defaultMigrationsDir, readMigrations } from '../../server/store/migrate.js';
import { migrateSqlite } from '../store/helpers.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE } from './helpers.js';

describe('vessel revisions (migration 007)', () => {
  it('keeps every saved vessel file, lists them newest first and names the revision each fit used', async () => {
    const t = await testApp();
    const as = t.auth('engineer');
    const v = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: as,
      payload: VESSEL_FILE,
    });
    expect(v.statusCode).toBe(201);
    const id = v.json().id as number;
    const m = multipart([{ field: 'log', name: 'log.csv', bytes: GOOD_LOG }], {
      testedAt: '2026-03-01T08:00:00Z',
    });
    const up1 = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(up1.statusCode).toBe(201);
    const edited = { ...VESSEL_FILE, shape: { kind: 'vertical-cylinder', diameterM: 3.1 } };
    const put = await t.app.inject({
      method: 'PUT',
      url: `/api/vessels/${id}`,
      headers: as,
      payload: edited,
    });
    expect(put.json().revision).toBe(2);
    const m2 = multipart(
      [{ field: 'log', name: 'log2.csv', bytes: Buffer.from(`${GOOD_LOG}4,1.92\n`) }],
      {
        testedAt: '2026-03-02T08:00:00Z',
      },
    );
    const up2 = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${id}/tests`,
      headers: { ...t.auth('technician'), ...m2.headers },
      payload: m2.payload,
    });
    expect(up2.statusCode).toBe(201);

    const list = await t.app.inject({
      url: `/api/vessels/${id}/revisions`,
      headers: t.auth('auditor'),
    });
    expect(list.statusCode).toBe(200);
    const items = list.json().items;
    expect(items.map((r: { revision: number }) => r.revision)).toEqual([2, 1]);
    expect(items[0].fitIds).toEqual([up2.json().fit.id]);
    expect(items[1].fitIds).toEqual([up1.json().fit.id]);
    expect(items[1].savedBy).toBe('engineer-1');

    const first = await t.app.inject({ url: `/api/vessels/${id}/revisions/1`, headers: as });
    expect(first.json().spec).toEqual(VESSEL_FILE);
    const used = await t.app.inject({
      url: `/api/fits/${up1.json().fit.id}/vessel-revision`,
      headers: as,
    });
    expect(used.json()).toMatchObject({ vesselId: id, revision: 1, spec: VESSEL_FILE });
    const none = await t.app.inject({ url: `/api/vessels/${id}/revisions/3`, headers: as });
    expect(none.statusCode).toBe(404);

    // the rules hold below the code too: a changed file without a new revision, or an edited revision, is refused
    await expect(
      t.store.sql.run(`UPDATE vessels SET spec = '{}' WHERE id = ?`, [id]),
    ).rejects.toThrow(/needs a new revision/);
    await expect(
      t.store.sql.run(`UPDATE vessel_revisions SET spec = '{}' WHERE vessel_id = ?`, [id]),
    ).rejects.toThrow(/never changed/);
  });

  it('fills the revisions of a database made before it from the audit log', async () => {
    const db = new Database(':memory:');
    const dir = defaultMigrationsDir();
    const before = readMigrations(dir).filter((f) => f.version < 7);
    // apply up to 006 by hand, the way the runner would have before this migration existed
    db.exec(
      'CREATE TABLE schema_migrations (version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)',
    );
    for (const f of before) {
      db.exec(f.sql);
      db.prepare('INSERT INTO schema_migrations VALUES (?, ?, ?)').run(f.version, f.name, 'x');
    }
    const spec1 = {
      name: 'V',
      shape: { kind: 'sphere', diameterM: 2 },
      outlet: { boreM: 0.02, elevationM: 0 },
    };
    const spec2 = { ...spec1, shape: { kind: 'sphere', diameterM: 2.1 } };
    db.prepare(
      `INSERT INTO sites (id, name, created_at) VALUES (1, 'main', '2025-01-01T00:00:00.000Z')`,
    ).run();
    db.prepare(
      `INSERT INTO vessels (id, site_id, name, spec, shape, revision, created_at, updated_at)
       VALUES (1, 1, 'V', ?, '{}', 2, '2025-01-01T00:00:00.000Z', '2025-06-01T00:00:00.000Z')`,
    ).run(JSON.stringify(spec2));
    const audit = db.prepare(
      `INSERT INTO audit_log (seq, at, actor_id, actor_name, action, entity_type, entity_id, before, after, prev_hash, hash)
       VALUES (?, ?, NULL, 'someone', ?, 'vessel', '1', NULL, ?, ?, ?)`,
    );
    audit.run(
      1,
      '2025-01-01T00:00:00.000Z',
      'vessel.create',
      JSON.stringify({ id: 1, revision: 1, spec: spec1 }),
      '0'.repeat(64),
      'a'.repeat(64),
    );
    audit.run(
      2,
      '2025-06-01T00:00:00.000Z',
      'vessel.update',
      JSON.stringify({ id: 1, revision: 2, spec: spec2 }),
      'a'.repeat(64),
      'b'.repeat(64),
    );
    await migrateSqlite(db, dir);
    const revs = db
      .prepare('SELECT revision, spec, saved_at FROM vessel_revisions ORDER BY revision')
      .all() as {
      revision: number;
      spec: string;
      saved_at: string;
    }[];
    expect(revs.map((r) => r.revision)).toEqual([1, 2]);
    expect(JSON.parse(revs[0].spec)).toEqual(spec1);
    expect(revs[0].saved_at).toBe('2025-01-01T00:00:00.000Z');
    expect(JSON.parse(revs[1].spec)).toEqual(spec2);
  });
});
