import { openStore, type Store, type StoreOptions } from '../../server/store/index.js';

/**
 * The one way a test opens a store (the HTTP helpers' testApp and every test that wants a store of
 * its own come through here), so the engine under the suites is chosen in one place. Today:
 * SQLite, in memory, or the data folder's file when `dataDir` is given. close() may be called
 * more than once (a test closes early, the file's afterAll closes again).
 */
export async function openTestStore(opts: StoreOptions = {}): Promise<Store> {
  const store = await openStore(opts);
  const close = store.close;
  let closed = false;
  store.close = async () => {
    if (closed) return;
    closed = true;
    await close();
  };
  return store;
}
