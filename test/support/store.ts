/**
 * The one way a test opens a store (the HTTP helpers' testApp and every test that wants a store of
 * its own come through here), so the engine under the suites is chosen in one place: SQLite, in
 * memory, or the data folder's file when `dataDir` is given; in the vitest project `postgres`
 * (EFFLUX_TEST_DATABASE_URL set) a new PostgreSQL database of its own for every store without a
 * data folder, dropped when the store is closed or the test file ends. close() may be called more
 * than once (a test closes early, the file's afterAll closes again).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';
import { openStore, type Store, type StoreOptions } from '../../server/store/index.js';
import { createMigratedTestDatabase } from './postgres.js';

const open: Store[] = [];
afterAll(async () => {
  for (const s of open.splice(0)) await s.close();
});

/** True in the PostgreSQL test project. */
export function testingOnPostgres(): boolean {
  return !!process.env.EFFLUX_TEST_DATABASE_URL;
}

export async function openTestStore(opts: StoreOptions = {}): Promise<Store> {
  if (!testingOnPostgres() || opts.dataDir || opts.databaseUrl)
    return withCleanup(await openStore(opts), async () => {});
  const db = await createMigratedTestDatabase();
  return withCleanup(await openStore({ ...opts, databaseUrl: db.url, poolSize: 4 }), () =>
    db.drop(),
  );
}

/**
 * Two stores on one database, as two processes or service instances see it: on SQLite two
 * connections to one file in a new data folder; on PostgreSQL two pools on one new database.
 * Closing the second also removes the database or the folder.
 */
export async function openTestStorePair(): Promise<[Store, Store]> {
  if (testingOnPostgres()) {
    const db = await createMigratedTestDatabase();
    const a = await openStore({ databaseUrl: db.url, poolSize: 4 });
    const b = await openStore({ databaseUrl: db.url, poolSize: 4 });
    return [a, withCleanup(b, () => db.drop())];
  }
  const dir = mkdtempSync(join(tmpdir(), 'efflux-pair-'));
  const a = await openStore({ dataDir: dir });
  const b = await openStore({ dataDir: dir });
  return [a, withCleanup(b, async () => rmSync(dir, { recursive: true, force: true }))];
}

/** close() also runs `after`; closing twice is harmless, as on SQLite; closed at the file's end at the latest. */
function withCleanup(store: Store, after: () => Promise<void>): Store {
  const close = store.close;
  let closed = false;
  store.close = async () => {
    if (closed) return;
    closed = true;
    await close();
    await after();
  };
  open.push(store);
  return store;
}
