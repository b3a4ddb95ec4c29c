/**
 * `efflux migrate-store`: the demo data folder (loaded the service's way: the demo loader with the
 * real analysis, approvals and the cleaning event) copied into a new, empty PostgreSQL database.
 * The test checks the copy on its own, apart from the command's verification: the same audit
 * chain head, the same report hashes, a session opened on the folder valid on the copy, ids
 * continuing past the copied ones; then a second copy into the now non-empty database is refused
 * (exit 2), and a copy changed behind the service's back fails `--verify` naming the row.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { loadDemo } from '../../server/jobs/demo.js';
import { fitReport, outletReport } from '../../server/render/report-service.js';
import { currentSoftware } from '../../server/render/software.js';
import { openStore, SYSTEM_ACTOR } from '../../server/store/index.js';
import { VESSEL_FILE } from '../http/helpers.js';
import { createTestDatabase, type TestDatabase } from '../support/postgres.js';
import { eff, envFor } from './serve-process.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const dir = mkdtempSync(join(tmpdir(), 'efflux-migrate-store-'));
let db: TestDatabase;
let sessionSecret: string;

beforeAll(async () => {
  const store = await openStore({ dataDir: dir });
  const report = await loadDemo(
    store,
    async (req) => analyzeDrainTest(req),
    join(root, 'sample-data/manifest.json'),
  );
  expect(report.skipped).toEqual([]);
  const { user } = await store.users.createToken(SYSTEM_ACTOR, 'reviewer', 'engineer');
  sessionSecret = (await store.users.openSession(user, 3_600_000)).secret;
  await store.close();
  db = await createTestDatabase(); // empty: no schema at all
}, 120_000);

afterAll(async () => {
  await db?.drop();
});

async function onTarget<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: db.url });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

describe('migrate-store: a data folder into PostgreSQL', () => {
  it('copies the demo folder and verifies it (exit 0)', async () => {
    const r = await eff(['migrate-store', '--from', dir, '--to', db.url], envFor(dir));
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/raw_files: \d+ of \d+ row\(s\) copied/);
    expect(r.stdout).toContain('matches the folder');
  }, 180_000);

  it('the copy has the same chain head, report hashes and sessions, and new ids follow the copied ones', async () => {
    const source = await openStore({ dataDir: dir });
    const target = await openStore({ databaseUrl: db.url, poolSize: 2 });
    try {
      const [a, b] = [await source.audit.verify(), await target.audit.verify()];
      expect(a.ok && b.ok).toBe(true);
      expect(a.count).toBeGreaterThan(50);
      expect(b.head).toBe(a.head);
      expect(b.count).toBe(a.count);

      const software = currentSoftware();
      const fitIds = (await source.sql.all<{ id: number }>('SELECT id FROM fits ORDER BY id')).map(
        (r) => Number(r.id),
      );
      expect(fitIds.length).toBeGreaterThan(10);
      for (const id of [fitIds[0], fitIds[fitIds.length - 1]]) {
        const [x, y] = [
          await fitReport(source, id, software),
          await fitReport(target, id, software),
        ];
        expect(y.contentSha256).toBe(x.contentSha256);
      }
      const outletId = Number(await source.sql.value('SELECT max(outlet_id) FROM fits'));
      expect((await outletReport(target, outletId, software)).contentSha256).toBe(
        (await outletReport(source, outletId, software)).contentSha256,
      );
      const rawBytes = 'SELECT sum(length(bytes)) FROM raw_files';
      expect(Number(await target.sql.value(rawBytes))).toBe(
        Number(await source.sql.value(rawBytes)),
      );

      expect((await target.users.bySession(sessionSecret))?.name).toBe('reviewer');

      const maxVessel = Number(await source.sql.value('SELECT max(id) FROM vessels'));
      const v = await target.vessels.create(SYSTEM_ACTOR, {
        ...VESSEL_FILE,
        name: 'after the move',
      } as never);
      expect(v.id).toBe(maxVessel + 1);
      expect((await target.audit.verify()).ok).toBe(true);
    } finally {
      await source.close();
      await target.close();
    }
  }, 180_000);

  it('a second copy into the now non-empty database is refused with exit 2, naming a table', async () => {
    const r = await eff(['migrate-store', '--from', dir, '--to', db.url], envFor(dir));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /^efflux: the database .* is not empty \(table \w+ holds \d+ row\(s\)\)/,
    );
  }, 60_000);

  it('a copy changed behind the service fails --verify naming the table and row (exit 1)', async () => {
    // the vessel added above is only in the copy; and one fit's stored number is changed
    const fitId = await onTarget(async (c) => {
      await c.query('ALTER TABLE fits DISABLE TRIGGER fits_immutable');
      const id = Number((await c.query('SELECT min(id) AS id FROM fits')).rows[0].id);
      await c.query('UPDATE fits SET cda_m2 = cda_m2 * 1.01 WHERE id = $1', [id]);
      await c.query('ALTER TABLE fits ENABLE TRIGGER fits_immutable');
      return id;
    });
    const r = await eff(['migrate-store', '--from', dir, '--to', db.url, '--verify'], envFor(dir));
    expect(r.code).toBe(1);
    expect(r.stdout).toContain('DOES NOT MATCH');
    expect(r.stdout).toContain(`table fits, row id=${fitId}: differs`);
    expect(r.stdout).toMatch(/table vessels, row id=\d+: only in the copy/);
    // the stored copy of the result no longer agrees with the fit's own result (audit verify's check)
    expect(r.stdout).toContain(`fits row ${fitId}: cda_m2 is`);
  }, 180_000);
});
