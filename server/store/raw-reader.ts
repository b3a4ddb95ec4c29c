/**
 * Reading stored raw files from another thread (the task pool's `series`): its own read-only
 * connection to the same SQLite database file, one per thread and file, so a 40 MB BLOB is not
 * read on the HTTP thread. Raw files are immutable (content-addressed, triggers refuse updates),
 * so any connection reads the same bytes. SQLite only: a store on another engine sends the bytes
 * (StoreEngine, databaseFile()).
 */
import Database from 'better-sqlite3';
import { NotFoundError } from './errors.js';
import { SqliteSql } from './sqlite-sql.js';

const connections = new Map<string, SqliteSql>();

export async function readStoredRaw(dbPath: string, sha256: string): Promise<Buffer> {
  let sql = connections.get(dbPath);
  if (!sql) {
    const db = new Database(dbPath, { readonly: true, fileMustExist: true });
    db.pragma('busy_timeout = 5000');
    sql = new SqliteSql(db);
    connections.set(dbPath, sql);
  }
  const b = await sql.value<Buffer>('SELECT bytes FROM raw_files WHERE sha256 = ?', [sha256]);
  if (!b) throw new NotFoundError('raw file', sha256);
  return b;
}
