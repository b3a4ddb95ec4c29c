/**
 * What is particular to the engine holding a store, kept out of the repositories (which speak only
 * Sql): where the database lives and the few operations that exist on one engine only. The
 * PostgreSQL engine adds its own member to StoreEngine.
 */
export interface SqliteEngine {
  kind: 'sqlite';
  /** The database file (task threads read raw bytes from it themselves); null in memory (tests). */
  path: string | null;
  /** The data folder holding the file (backup, check, restore, the reserve); null in memory. */
  dataDir: string | null;
}

export type StoreEngine = SqliteEngine;

/** The database file of a store, when it is one file that another thread can open read-only. */
export function databaseFile(engine: StoreEngine): string | null {
  return engine.kind === 'sqlite' ? engine.path : null;
}
