import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { openStore, type Store } from '../../server/store/index.js';
import { ForeignWrites, ReadCache } from '../../server/store/read-cache.js';
import { FIT_RESULT, memoryStore, SYSTEM_ACTOR, VESSEL } from './helpers.js';

const bytes = new TextEncoder().encode('t,level\n0,2\n1,1.9\n');

function upload(s: Store, vesselId: number, outletId: number, name = 'log.csv') {
  return s.tests.createPending(SYSTEM_ACTOR, {
    vesselId,
    outletId,
    log: { bytes, fileName: name },
    settings: {},
    allowDuplicate: true,
  }); // the same bytes on purpose: caching, not duplicates, is tested here
}

function withFit(s: Store) {
  const v = s.vessels.create(SYSTEM_ACTOR, VESSEL);
  const t = upload(s, v.id, v.outlets[0].id);
  const f = s.fits.storeFirst(
    SYSTEM_ACTOR,
    t.id,
    { rows: 3 },
    { settings: {}, result: FIT_RESULT, vessel: VESSEL },
  );
  return { v, t, f };
}

const read = (b: Buffer) => JSON.parse(b.toString('utf8'));

describe('ready answers kept in memory', () => {
  it('a fit: the same object as get(); a review and a refit show at once; the digest follows the bytes', () => {
    const s = memoryStore();
    const { f } = withFit(s);
    const first = s.fits.getText(f.id);
    expect(read(first.body)).toEqual(s.fits.get(f.id));
    expect(s.fits.getText(f.id)).toBe(first); // from memory
    s.fits.review(SYSTEM_ACTOR, f.id, 'rejected', 'noisy');
    const reviewed = s.fits.getText(f.id);
    expect(read(reviewed.body)).toMatchObject({ status: 'rejected', review: { comment: 'noisy' } });
    expect(reviewed.digest).not.toBe(first.digest);
    const g = s.fits.storeFirst(
      SYSTEM_ACTOR,
      upload(s, f.vesselId, f.outletId!, 'b.csv').id,
      {},
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    s.fits.getText(g.id);
    const h = s.fits.refit(SYSTEM_ACTOR, g.id, {
      settings: { window: '1..2' },
      result: FIT_RESULT,
      vessel: VESSEL,
    });
    expect(read(s.fits.getText(g.id).body).supersededBy).toBe(h.id);
  });

  it("a vessel's page of tests follows uploads, analyses and withdrawals", () => {
    const s = memoryStore();
    const { v, t } = withFit(s);
    const page = () => read(s.tests.pageText(v.id, 10, 0).body);
    expect(page()).toEqual({ ...s.tests.listByVessel(v.id, 10, 0), limit: 10, offset: 0 });
    const t2 = upload(s, v.id, v.outlets[0].id, 'c.csv');
    expect(page().items.map((x: { id: number }) => x.id)).toEqual([t2.id, t.id]);
    expect(page().items[0].status).toBe('pending');
    s.fits.storeFirst(
      SYSTEM_ACTOR,
      t2.id,
      { rows: 2 },
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    expect(page().items[0]).toMatchObject({ status: 'analysed', detected: { rows: 2 } });
    const t3 = upload(s, v.id, v.outlets[0].id, 'd.csv');
    expect(page().total).toBe(3);
    s.tests.withdraw(SYSTEM_ACTOR, t3.id, 'refused');
    expect(page().total).toBe(2);
  });

  it('credentials: a session expires on the clock, and a closed one is refused at once', () => {
    const s = memoryStore(); // its clock moves one second per reading
    const { user } = s.users.createToken(SYSTEM_ACTOR, 'ana', 'engineer');
    const short = s.users.openSession(user, 4_000);
    expect(s.users.bySession(short.secret)).toEqual(user);
    expect(s.users.bySession(short.secret)).toEqual(user); // from memory
    for (let i = 0; i < 4; i++) s.users.bySession(short.secret);
    expect(s.users.bySession(short.secret)).toBeNull();
    const long = s.users.openSession(user, 3_600_000);
    expect(s.users.bySession(long.secret)).toEqual(user);
    s.users.closeSession(user, long.secret);
    expect(s.users.bySession(long.secret)).toBeNull();
  });

  it('LRU: bounded by size, the least recently read goes first', () => {
    const s = memoryStore();
    const c = new ReadCache<string>(new ForeignWrites(s.db), 10, (x) => x.length);
    c.set('a', 'aaaa');
    c.set('b', 'bbbb');
    c.get('a');
    c.set('c', 'cccc');
    expect([c.get('a'), c.get('b'), c.get('c')]).toEqual(['aaaa', undefined, 'cccc']);
    c.set('big', 'x'.repeat(11));
    expect(c.get('big')).toBeUndefined();
  });
});

describe('writes by another connection (a second process on the same file)', () => {
  let dir = '';
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('empty the caches: a review, a new test and a new token elsewhere are seen', () => {
    dir = mkdtempSync(join(tmpdir(), 'efflux-cache-'));
    const a = openStore({ dataDir: dir });
    const b = openStore({ dataDir: dir });
    try {
      const { v, f } = withFit(a);
      const { token, user } = a.users.createToken(SYSTEM_ACTOR, 'ana', 'engineer');
      expect(read(a.fits.getText(f.id).body).status).toBe('draft');
      expect(read(a.tests.pageText(v.id, 5, 0).body).total).toBe(1);
      expect(a.users.byToken(token)).toEqual(user);
      b.fits.review(SYSTEM_ACTOR, f.id, 'approved', null);
      upload(b, v.id, v.outlets[0].id, 'other.csv');
      b.db.prepare('UPDATE api_tokens SET revoked_at = ?').run('2026-01-01T00:00:00Z');
      expect(read(a.fits.getText(f.id).body).status).toBe('approved');
      expect(read(a.tests.pageText(v.id, 5, 0).body).total).toBe(2);
      expect(a.users.byToken(token)).toBeNull();
    } finally {
      a.close();
      b.close();
    }
  });
});
