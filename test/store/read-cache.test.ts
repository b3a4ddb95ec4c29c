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

async function withFit(s: Store) {
  const v = await s.vessels.create(SYSTEM_ACTOR, VESSEL);
  const t = await upload(s, v.id, v.outlets[0].id);
  const f = await s.fits.storeFirst(
    SYSTEM_ACTOR,
    t.id,
    { rows: 3 },
    { settings: {}, result: FIT_RESULT, vessel: VESSEL },
  );
  return { v, t, f };
}

const read = (b: Buffer) => JSON.parse(b.toString('utf8'));

describe('ready answers kept in memory', () => {
  it('a fit: the same object as get(); a review and a refit show at once; the digest follows the bytes', async () => {
    const s = await memoryStore();
    const { f } = await withFit(s);
    const first = await s.fits.getText(f.id);
    expect(read(first.body)).toEqual(await s.fits.get(f.id));
    expect(await s.fits.getText(f.id)).toBe(first); // from memory
    await s.fits.review(SYSTEM_ACTOR, f.id, 'rejected', 'noisy');
    const reviewed = await s.fits.getText(f.id);
    expect(read(reviewed.body)).toMatchObject({ status: 'rejected', review: { comment: 'noisy' } });
    expect(reviewed.digest).not.toBe(first.digest);
    const g = await s.fits.storeFirst(
      SYSTEM_ACTOR,
      (await upload(s, f.vesselId, f.outletId!, 'b.csv')).id,
      {},
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    await s.fits.getText(g.id);
    const h = await s.fits.refit(SYSTEM_ACTOR, g.id, {
      settings: { window: '1..2' },
      result: FIT_RESULT,
      vessel: VESSEL,
    });
    expect(read((await s.fits.getText(g.id)).body).supersededBy).toBe(h.id);
  });

  it('a read that loaded the old fit while a review ran is not kept after the review', async () => {
    const s = await memoryStore();
    const { f } = await withFit(s);
    // both start together: the read loads the draft row, the review commits, then the read ends
    const [early] = await Promise.all([
      s.fits.getText(f.id),
      s.fits.review(SYSTEM_ACTOR, f.id, 'approved', null),
    ]);
    expect(['draft', 'approved']).toContain(read(early.body).status);
    expect(read((await s.fits.getText(f.id)).body).status).toBe('approved');
  });

  it("a vessel's page of tests follows uploads, analyses and withdrawals", async () => {
    const s = await memoryStore();
    const { v, t } = await withFit(s);
    const page = async () => read((await s.tests.pageText(v.id, 10, 0)).body);
    expect(await page()).toEqual({
      ...(await s.tests.listByVessel(v.id, 10, 0)),
      limit: 10,
      offset: 0,
    });
    const t2 = await upload(s, v.id, v.outlets[0].id, 'c.csv');
    expect((await page()).items.map((x: { id: number }) => x.id)).toEqual([t2.id, t.id]);
    expect((await page()).items[0].status).toBe('pending');
    await s.fits.storeFirst(
      SYSTEM_ACTOR,
      t2.id,
      { rows: 2 },
      { settings: {}, result: FIT_RESULT, vessel: VESSEL },
    );
    expect((await page()).items[0]).toMatchObject({ status: 'analysed', detected: { rows: 2 } });
    const t3 = await upload(s, v.id, v.outlets[0].id, 'd.csv');
    expect((await page()).total).toBe(3);
    await s.tests.withdraw(SYSTEM_ACTOR, t3.id, 'refused');
    expect((await page()).total).toBe(2);
  });

  it('credentials: a session expires on the clock, and a closed one is refused at once', async () => {
    const s = await memoryStore(); // its clock moves one second per reading
    const { user } = await s.users.createToken(SYSTEM_ACTOR, 'ana', 'engineer');
    const short = await s.users.openSession(user, 4_000);
    expect(await s.users.bySession(short.secret)).toEqual(user);
    expect(await s.users.bySession(short.secret)).toEqual(user); // from memory
    for (let i = 0; i < 4; i++) await s.users.bySession(short.secret);
    expect(await s.users.bySession(short.secret)).toBeNull();
    const long = await s.users.openSession(user, 3_600_000);
    expect(await s.users.bySession(long.secret)).toEqual(user);
    await s.users.closeSession(user, long.secret);
    expect(await s.users.bySession(long.secret)).toBeNull();
  });

  it('LRU: bounded by size, the least recently read goes first', async () => {
    const c = new ReadCache<string>(new ForeignWrites(() => 0), 10, (x) => x.length);
    await c.set('a', 'aaaa');
    await c.set('b', 'bbbb');
    await c.get('a');
    await c.set('c', 'cccc');
    expect([await c.get('a'), await c.get('b'), await c.get('c')]).toEqual([
      'aaaa',
      undefined,
      'cccc',
    ]);
    await c.set('big', 'x'.repeat(11));
    expect(await c.get('big')).toBeUndefined();
  });

  it('a value loaded before a delete or a foreign commit is not kept', async () => {
    let version = 0;
    const c = new ReadCache<string>(new ForeignWrites(() => version), 100, (x) => x.length);
    expect(await c.get('k')).toBeUndefined();
    const since = c.generation;
    c.delete('k'); // this process wrote while the value was being loaded
    await c.set('k', 'old', since);
    expect(await c.get('k')).toBeUndefined();
    const again = c.generation;
    version++; // another connection committed while the value was being loaded
    await c.set('k', 'old', again);
    expect(await c.get('k')).toBeUndefined();
    await c.set('k', 'new', c.generation);
    expect(await c.get('k')).toBe('new');
  });
});

describe('writes by another connection (a second process on the same file)', () => {
  let dir = '';
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('empty the caches: a review, a new test and a new token elsewhere are seen', async () => {
    dir = mkdtempSync(join(tmpdir(), 'efflux-cache-'));
    const a = await openStore({ dataDir: dir });
    const b = await openStore({ dataDir: dir });
    try {
      const { v, f } = await withFit(a);
      const { token, user } = await a.users.createToken(SYSTEM_ACTOR, 'ana', 'engineer');
      expect(read((await a.fits.getText(f.id)).body).status).toBe('draft');
      expect(read((await a.tests.pageText(v.id, 5, 0)).body).total).toBe(1);
      expect(await a.users.byToken(token)).toEqual(user);
      await b.fits.review(SYSTEM_ACTOR, f.id, 'approved', null);
      await upload(b, v.id, v.outlets[0].id, 'other.csv');
      await b.sql.run('UPDATE api_tokens SET revoked_at = ?', ['2026-01-01T00:00:00Z']);
      expect(read((await a.fits.getText(f.id)).body).status).toBe('approved');
      expect(read((await a.tests.pageText(v.id, 5, 0)).body).total).toBe(2);
      expect(await a.users.byToken(token)).toBeNull();
    } finally {
      await a.close();
      await b.close();
    }
  });
});
