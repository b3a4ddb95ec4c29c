import { describe, expect, it } from 'vitest';
import { ConflictError, NotFoundError } from '../../server/store/index.js';
import { sha256Hex } from '../../server/store/tests.js';
import { FIT_RESULT, memoryStore, SYSTEM_ACTOR, VESSEL } from './helpers.js';

const bytes = new TextEncoder().encode('time_s,level_m\n0,2.0\n1,1.99\n');

function withTest() {
  const s = memoryStore();
  const v = s.vessels.create(SYSTEM_ACTOR, VESSEL);
  const t = s.tests.createPending(SYSTEM_ACTOR, {
    vesselId: v.id,
    outletId: v.outlets[0].id,
    log: { bytes, fileName: 'log.csv' },
    settings: { fitInflow: true },
    operator: 'op',
  });
  return { s, v, t };
}

describe('vessels', () => {
  it('stores the file whole with one row per outlet, and retires a dropped outlet on update', () => {
    const s = memoryStore();
    const v = s.vessels.create(SYSTEM_ACTOR, VESSEL);
    expect(v.outlets.map((o) => [o.key, o.boreM, o.actionThreshold])).toEqual([
      ['drain', 0.03, 0.8],
      ['overflow', 0.05, null],
    ]);
    expect(v.spec).toEqual(VESSEL);
    const u = s.vessels.update(SYSTEM_ACTOR, v.id, {
      ...VESSEL,
      outlets: [{ id: 'drain', boreM: 0.031 }],
    });
    expect(u.revision).toBe(2);
    expect(u.outlets.find((o) => o.key === 'drain')!.boreM).toBe(0.031);
    expect(u.outlets.find((o) => o.key === 'overflow')!.retiredAt).not.toBeNull();
    expect(u.outlets[0].id).toBe(v.outlets[0].id);
  });

  it('refuses a second vessel of the same name at the same site', () => {
    const s = memoryStore();
    s.vessels.create(SYSTEM_ACTOR, VESSEL);
    expect(() => s.vessels.create(SYSTEM_ACTOR, VESSEL)).toThrow(ConflictError);
    expect(s.audit.list().length).toBe(1);
  });
});

describe('drain tests and fits', () => {
  it('keeps the raw bytes exactly, addressed by their SHA-256', () => {
    const { s, t } = withTest();
    expect(t.sha256).toBe(sha256Hex(bytes));
    expect(t.status).toBe('pending');
    expect(Buffer.compare(s.tests.rawBytes(t.sha256), Buffer.from(bytes))).toBe(0);
  });

  it('withdraws a pending test and its unshared bytes', () => {
    const { s, t } = withTest();
    s.tests.withdraw(SYSTEM_ACTOR, t.id, 'refused');
    expect(() => s.tests.get(t.id)).toThrow(NotFoundError);
    expect(() => s.tests.rawBytes(t.sha256)).toThrow(NotFoundError);
    expect(s.audit.verify().ok).toBe(true);
  });

  it('stores a first fit as draft, refits (old superseded, kept), reviews once', () => {
    const { s, t } = withTest();
    const f1 = s.fits.storeFirst(
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
    expect(s.tests.get(t.id).status).toBe('analysed');
    const f2 = s.fits.refit(SYSTEM_ACTOR, f1.id, {
      settings: { window: '20..800' },
      result: FIT_RESULT,
      vessel: VESSEL,
    });
    expect(s.fits.get(f1.id).supersededBy).toBe(f2.id);
    expect(() =>
      s.fits.refit(SYSTEM_ACTOR, f1.id, { settings: {}, result: FIT_RESULT, vessel: VESSEL }),
    ).toThrow(ConflictError);
    expect(() => s.fits.review(SYSTEM_ACTOR, f1.id, 'approved', null)).toThrow(ConflictError);
    const ok = s.fits.review(SYSTEM_ACTOR, f2.id, 'approved', 'window checked');
    expect(ok.status).toBe('approved');
    expect(ok.review?.comment).toBe('window checked');
    expect(() => s.fits.review(SYSTEM_ACTOR, f2.id, 'rejected', null)).toThrow(ConflictError);
    expect(s.fits.listByTest(t.id).map((f) => f.id)).toEqual([f1.id, f2.id]);
    expect(s.audit.verify().ok).toBe(true);
  });

  it('triggers refuse rewriting or deleting fits and analysed tests, even through raw SQL', () => {
    const { s, t } = withTest();
    const f = s.fits.storeFirst(
      SYSTEM_ACTOR,
      t.id,
      {},
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    const db = s.db;
    expect(() => db.prepare('DELETE FROM fits WHERE id = ?').run(f.id)).toThrow(/never deleted/);
    expect(() => db.prepare(`UPDATE fits SET result = '{}' WHERE id = ?`).run(f.id)).toThrow(
      /never overwritten/,
    );
    db.prepare(`UPDATE fits SET status = 'approved', reviewed_at = 'x' WHERE id = ?`).run(f.id);
    expect(() => db.prepare(`UPDATE fits SET status = 'rejected' WHERE id = ?`).run(f.id)).toThrow(
      /never overwritten/,
    );
    expect(() => db.prepare('DELETE FROM drain_tests WHERE id = ?').run(t.id)).toThrow(
      /cannot be deleted/,
    );
    expect(() =>
      db.prepare(`UPDATE drain_tests SET log_name = 'x' WHERE id = ?`).run(t.id),
    ).toThrow(/immutable/);
    expect(() => db.prepare(`UPDATE raw_files SET size = 0`).run()).toThrow(/immutable/);
  });
});

describe('users', () => {
  it('keeps tokens and sessions only as hashes', () => {
    const s = memoryStore();
    const { token, user } = s.users.createToken(SYSTEM_ACTOR, 'ana', 'technician');
    expect(s.users.byToken(token)).toEqual(user);
    expect(s.users.byToken(token + 'x')).toBeNull();
    const stored = s.db.prepare('SELECT token_hash FROM api_tokens').pluck().all() as string[];
    expect(stored).not.toContain(token);
    const { secret } = s.users.openSession(user, 60_000);
    expect(s.users.bySession(secret)).toEqual(user);
    s.users.closeSession(user, secret);
    expect(s.users.bySession(secret)).toBeNull();
  });

  it('events are append-only', () => {
    const s = memoryStore();
    const v = s.vessels.create(SYSTEM_ACTOR, VESSEL);
    const e = s.events.create(SYSTEM_ACTOR, {
      vesselId: v.id,
      outletId: v.outlets[0].id,
      kind: 'cleaned',
      occurredAt: '2026-02-01',
    });
    expect(s.events.listByVessel(v.id, 10, 0).items).toEqual([e]);
    expect(() => s.db.prepare('DELETE FROM maintenance_events').run()).toThrow(/append-only/);
  });
});

describe('JSON rendered by SQLite for the hot reads', () => {
  it('matches the objects the repositories build, reviewed or not, with and without a barometric file', () => {
    const { s, v, t } = withTest();
    const t2 = s.tests.createPending(SYSTEM_ACTOR, {
      vesselId: v.id,
      outletId: null,
      log: { bytes: new TextEncoder().encode('x\n1\n'), fileName: 'b.csv' },
      baro: { bytes: new TextEncoder().encode('p\n101.3\n'), fileName: 'baro.csv' },
      settings: {},
    });
    const f = s.fits.storeFirst(
      SYSTEM_ACTOR,
      t.id,
      { a: [1, 2.5e-7, null], s: 'é' },
      { settings: { window: '1..2' }, result: FIT_RESULT, vessel: VESSEL },
    );
    expect(JSON.parse(s.fits.getJson(f.id))).toEqual(s.fits.get(f.id));
    s.fits.review(SYSTEM_ACTOR, f.id, 'rejected', 'noisy');
    expect(JSON.parse(s.fits.getJson(f.id))).toEqual(s.fits.get(f.id));
    const page = s.tests.listByVesselJson(v.id, 10, 0);
    expect(JSON.parse(page.itemsJson)).toEqual(s.tests.listByVessel(v.id, 10, 0).items);
    expect(JSON.parse(page.itemsJson).map((x: { id: number }) => x.id)).toEqual([t2.id, t.id]);
    expect(() => s.fits.getJson(999)).toThrow(NotFoundError);
  });
});
