/**
 * Reading stored raw files from another thread (the task pool's `series`): its own read-only
 * connection to the same database file, one per thread and file, so a 40 MB BLOB is not read on
 * the HTTP thread. Raw files are immutable (content-addressed, triggers refuse updates), so any
 * connection reads the same bytes.
 */
import Database from 'better-sqlite3';
import { NotFoundError } from './errors.js';

const connections = new Map<string, Database.Database>();

export function readStoredRaw(dbPath: string, sha256: string): Buffer {
  let db = connections.get(dbPath);
  if (!db) {
    db = new Database(dbPath, { readonly: true, fileMustExist: true });
    db.pragma('busy_timeout = 5000');
    connections.set(dbPath, db);
  }
  const b = db.prepare('SELECT bytes FROM raw_files WHERE sha256 = ?').pluck().get(sha256) as
    | Buffer
    | undefined;
  if (!b) throw new NotFoundError('raw file', sha256);
  return b;
}
