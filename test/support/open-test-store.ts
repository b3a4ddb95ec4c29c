// The one way tests open a store: SQLite in memory (or in a data folder when one is given), or,
// in the vitest project `postgres` (EFFLUX_TEST_DATABASE_URL set), a new PostgreSQL database of
// its own for every store, dropped when the store is closed or the test file ends.
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
  if (!testingOnPostgres() || opts.dataDir || opts.databaseUrl) return openStore(opts);
  const db = await createMigratedTestDatabase();
  const store = await openStore({ ...opts, databaseUrl: db.url, poolSize: 4 });
  let closed = false;
  const close = store.close;
  store.close = async () => {
    if (closed) return; // closing twice is harmless, as on SQLite
    closed = true;
    await close();
    await db.drop();
  };
  open.push(store);
  return store;
}
