import { describe, expect, it } from 'vitest';
import { ConflictError, NotFoundError } from '../../server/store/index.js';
import { sha256Hex } from '../../server/store/tests.js';
import { FIT_RESULT, memoryStore, SYSTEM_ACTOR, VESSEL } from './helpers.js';

const bytes = new TextEncoder().encode('time_s,level_m\n0,2.0\n1,1.99\n');

async function withTest() {
  const s = await memoryStore();
  const v = await s.vessels.create(SYSTEM_ACTOR, VESSEL);
  const t = await s.tests.createPending(SYSTEM_ACTOR, {
    vesselId: v.id,
    outletId: v.outlets[0].id,
    log: { bytes, fileName: 'log.csv' },
    settings: { fitInflow: true },
    operator: 'op',
  });
  return { s, v, t };
}

describe('vessels', () => {
  it('stores the file whole with one row per outlet, and retires a dropped outlet on update', async () => {
    const s = await memoryStore();
    const v = await s.vessels.create(SYSTEM_ACTOR, VESSEL);
    expect(v.outlets.map((o) => [o.key, o.boreM, o.actionThreshold])).toEqual([
      ['drain', 0.03, 0.8],
      ['overflow', 0.05, null],
    ]);
    expect(v.spec).toEqual(VESSEL);
    const u = await s.vessels.update(SYSTEM_ACTOR, v.id, {
      ...VESSEL,
      outlets: [{ id: 'drain', boreM: 0.031 }],
    });
    expect(u.revision).toBe(2);
    expect(u.outlets.find((o) => o.key === 'drain')!.boreM).toBe(0.031);
    expect(u.outlets.find((o) => o.key === 'overflow')!.retiredAt).not.toBeNull();
    expect(u.outlets[0].id).toBe(v.outlets[0].id);
  });

  it('refuses a second vessel of the same name at the same site', async () => {
    const s = await memoryStore();
    await s.vessels.create(SYSTEM_ACTOR, VESSEL);
    await expect(s.vessels.create(SYSTEM_ACTOR, VESSEL)).rejects.toThrow(ConflictError);
    expect((await s.audit.list()).length).toBe(1);
  });

  it('lists only the sites asked for (the JSON array of site names)', async () => {
    const s = await memoryStore();
    const a = await s.vessels.create(SYSTEM_ACTOR, { ...VESSEL, site: 'north' });
    const b = await s.vessels.create(SYSTEM_ACTOR, { ...VESSEL, site: 'south' });
    expect((await s.vessels.list(10, 0, ['south'])).items.map((v) => v.id)).toEqual([b.id]);
    expect((await s.vessels.list(10, 0, ['north', 'south'])).total).toBe(2);
    expect((await s.vessels.list(10, 0, [])).total).toBe(0);
    expect((await s.vessels.list(10, 0)).items.map((v) => v.id)).toEqual([a.id, b.id]);
  });
});

describe('drain tests and fits', () => {
  it('keeps the raw bytes exactly, addressed by their SHA-256', async () => {
    const { s, t } = await withTest();
    expect(t.sha256).toBe(sha256Hex(bytes));
    expect(t.status).toBe('pending');
    expect(Buffer.compare(await s.tests.rawBytes(t.sha256), Buffer.from(bytes))).toBe(0);
  });

  it('withdraws a pending test and its unshared bytes', async () => {
    const { s, t } = await withTest();
    await s.tests.withdraw(SYSTEM_ACTOR, t.id, 'refused');
    await expect(s.tests.get(t.id)).rejects.toThrow(NotFoundError);
    await expect(s.tests.rawBytes(t.sha256)).rejects.toThrow(NotFoundError);
    expect((await s.audit.verify()).ok).toBe(true);
  });

  it('stores a first fit as draft, refits (old superseded, kept), reviews once', async () => {
    const { s, t } = await withTest();
    const f1 = await s.fits.storeFirst(
      SYSTEM_ACTOR,
      t.id,
      { columns: [] },
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    expect(f1).toMatchObject({
      status: 'draft',
      engineVersion: 'test-0',
      supersededBy: null,
      testId: t.id,
    });
    expect((await s.tests.get(t.id)).status).toBe('analysed');
    const f2 = await s.fits.refit(SYSTEM_ACTOR, f1.id, {
      settings: { window: '20..800' },
      result: FIT_RESULT,
      vessel: VESSEL,
    });
    expect((await s.fits.get(f1.id)).supersededBy).toBe(f2.id);
    await expect(
      s.fits.refit(SYSTEM_ACTOR, f1.id, { settings: {}, result: FIT_RESULT, vessel: VESSEL }),
    ).rejects.toThrow(ConflictError);
    await expect(s.fits.review(SYSTEM_ACTOR, f1.id, 'approved', null)).rejects.toThrow(
      ConflictError,
    );
    const ok = await s.fits.review(SYSTEM_ACTOR, f2.id, 'approved', 'window checked');
    expect(ok.status).toBe('approved');
    expect(ok.review?.comment).toBe('window checked');
    await expect(s.fits.review(SYSTEM_ACTOR, f2.id, 'rejected', null)).rejects.toThrow(
      ConflictError,
    );
    expect((await s.fits.listByTest(t.id)).map((f) => f.id)).toEqual([f1.id, f2.id]);
    expect((await s.audit.verify()).ok).toBe(true);
  });

  it('a repository write inside a failing transaction is rolled back with it, audit entry and all', async () => {
    const { s } = await withTest();
    const before = await s.audit.list();
    await expect(
      s.sql.tx(async () => {
        await s.vessels.create(SYSTEM_ACTOR, { ...VESSEL, name: 'T-2' }); // joins this transaction
        throw new Error('a later step failed');
      }),
    ).rejects.toThrow(/later step/);
    expect(await s.vessels.count()).toBe(1);
    expect(await s.audit.list()).toEqual(before);
    expect((await s.audit.verify()).ok).toBe(true);
  });

  it('concurrent writes from many requests each commit whole, and the audit chain stays one line', async () => {
    const { s, v } = await withTest();
    const uploads = Array.from({ length: 20 }, (_, i) =>
      s.tests.createPending(SYSTEM_ACTOR, {
        vesselId: v.id,
        outletId: v.outlets[0].id,
        log: { bytes: new TextEncoder().encode(`time_s,level_m\n0,${i}\n`), fileName: `${i}.csv` },
        settings: {},
      }),
    );
    const stored = await Promise.all(uploads);
    expect(new Set(stored.map((t) => t.id)).size).toBe(20);
    const chain = await s.audit.verify();
    expect(chain).toMatchObject({ ok: true, count: 1 + 1 + 20 }); // vessel, first test, 20 uploads
    expect(await s.tests.count()).toBe(21);
  });

  it('triggers refuse rewriting or deleting fits and analysed tests, even through raw SQL', async () => {
    const { s, t } = await withTest();
    const f = await s.fits.storeFirst(
      SYSTEM_ACTOR,
      t.id,
      {},
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    const sql = s.sql;
    await expect(sql.run('DELETE FROM fits WHERE id = ?', [f.id])).rejects.toThrow(/never deleted/);
    await expect(sql.run(`UPDATE fits SET result = '{}' WHERE id = ?`, [f.id])).rejects.toThrow(
      /never overwritten/,
    );
    await sql.run(`UPDATE fits SET status = 'approved', reviewed_at = 'x' WHERE id = ?`, [f.id]);
    await expect(
      sql.run(`UPDATE fits SET status = 'rejected' WHERE id = ?`, [f.id]),
    ).rejects.toThrow(/never overwritten/);
    await expect(sql.run('DELETE FROM drain_tests WHERE id = ?', [t.id])).rejects.toThrow(
      /cannot be deleted/,
    );
    await expect(
      sql.run(`UPDATE drain_tests SET log_name = 'x' WHERE id = ?`, [t.id]),
    ).rejects.toThrow(/immutable/);
    await expect(sql.run(`UPDATE raw_files SET size = 0`)).rejects.toThrow(/immutable/);
  });
});

describe('users', () => {
  it('keeps tokens and sessions only as hashes', async () => {
    const s = await memoryStore();
    const { token, user } = await s.users.createToken(SYSTEM_ACTOR, 'ana', 'technician');
    expect(await s.users.byToken(token)).toEqual(user);
    expect(await s.users.byToken(token + 'x')).toBeNull();
    const stored = (
      await s.sql.all<{ token_hash: string }>('SELECT token_hash FROM api_tokens')
    ).map((r) => r.token_hash);
    expect(stored).not.toContain(token);
    const { secret } = await s.users.openSession(user, 60_000);
    expect(await s.users.bySession(secret)).toEqual(user);
    await s.users.closeSession(user, secret);
    expect(await s.users.bySession(secret)).toBeNull();
  });

  it('events are append-only', async () => {
    const s = await memoryStore();
    const v = await s.vessels.create(SYSTEM_ACTOR, VESSEL);
    const e = await s.events.create(SYSTEM_ACTOR, {
      vesselId: v.id,
      outletId: v.outlets[0].id,
      kind: 'cleaned',
      occurredAt: '2026-02-01',
    });
    expect((await s.events.listByVessel(v.id, 10, 0)).items).toEqual([e]);
    await expect(s.sql.run('DELETE FROM maintenance_events')).rejects.toThrow(/append-only/);
  });
});

describe('JSON rendered by SQLite for the hot reads', () => {
  it('matches the objects the repositories build, reviewed or not, with and without a barometric file', async () => {
    const { s, v, t } = await withTest();
    const t2 = await s.tests.createPending(SYSTEM_ACTOR, {
      vesselId: v.id,
      outletId: null,
      log: { bytes: new TextEncoder().encode('x\n1\n'), fileName: 'b.csv' },
      baro: { bytes: new TextEncoder().encode('p\n101.3\n'), fileName: 'baro.csv' },
      settings: {},
    });
    const f = await s.fits.storeFirst(
      SYSTEM_ACTOR,
      t.id,
      { a: [1, 2.5e-7, null], s: 'é' },
      { settings: { window: '1..2' }, result: FIT_RESULT, vessel: VESSEL },
    );
    expect(JSON.parse(await s.fits.getJson(f.id))).toEqual(await s.fits.get(f.id));
    await s.fits.review(SYSTEM_ACTOR, f.id, 'rejected', 'noisy');
    expect(JSON.parse(await s.fits.getJson(f.id))).toEqual(await s.fits.get(f.id));
    const page = await s.tests.listByVesselJson(v.id, 10, 0);
    expect(JSON.parse(page.itemsJson)).toEqual((await s.tests.listByVessel(v.id, 10, 0)).items);
    expect(JSON.parse(page.itemsJson).map((x: { id: number }) => x.id)).toEqual([t2.id, t.id]);
    await expect(s.fits.getJson(999)).rejects.toThrow(NotFoundError);
  });
});
