import Database from 'better-sqlite3';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';

export type Db = Database.Database;

/**
 * Opens (creating if needed) the service database in `dataDir`.
 * - WAL: readers never block the single writer, and a crash leaves the last committed state.
 * - synchronous = FULL: every commit is fsynced into the WAL before it returns, so an upload
 *   answered 201 survives a power cut too, not only a killed process (NORMAL would lose the last
 *   commits on power loss). The cost is one fsync per write transaction, small beside an analysis.
 * - foreign_keys ON: SQLite leaves them off unless asked, per connection.
 */
export function openDatabase(dataDir: string, fileName = 'efflux.sqlite'): Db {
  mkdirSync(dataDir, { recursive: true });
  return configure(new Database(join(dataDir, fileName)));
}

/** An in-memory database with the same settings (tests). */
export function openMemoryDatabase(): Db {
  return configure(new Database(':memory:'));
}

function configure(db: Db): Db {
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  db.pragma('foreign_keys = ON');
  db.pragma('busy_timeout = 5000');
  return db;
}
