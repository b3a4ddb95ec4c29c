/**
 * One server per data folder. The lock is an SQLite file (`efflux.lock.sqlite`) opened in
 * EXCLUSIVE locking mode with one write: the operating system's file lock is held for as long as the
 * connection is open and released when the process ends however it ends (no stale lock to clear by
 * hand after a crash or kill -9). Who holds it is written beside it (`efflux.lock.json`) so a second
 * start can name the first: pid, host, start time.
 * Why not a lock-file package: they lock by pid file or mkdir and must guess when a lock is stale;
 * the OS lock SQLite takes cannot outlive its process, and better-sqlite3 is here already.
 */
import Database from 'better-sqlite3';
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';

export const LOCK_FILE = 'efflux.lock.sqlite';
export const HOLDER_FILE = 'efflux.lock.json';

export interface LockHolder {
  pid: number;
  host: string;
  startedAt: string;
  command: string;
}

/** The data folder is held by another process (the CLI exits 2 with this line). */
export class FolderBusyError extends Error {
  constructor(
    readonly dataDir: string,
    readonly holder: LockHolder | null,
  ) {
    super(
      holder
        ? `the data folder ${dataDir} is in use by "${holder.command}" (pid ${holder.pid} on ${holder.host}, started ${holder.startedAt}); stop it first`
        : `the data folder ${dataDir} is in use by another efflux process; stop it first`,
    );
    this.name = 'FolderBusyError';
  }
}

export interface FolderLock {
  release(): void;
}

export function readHolder(dataDir: string): LockHolder | null {
  try {
    return JSON.parse(readFileSync(join(dataDir, HOLDER_FILE), 'utf8')) as LockHolder;
  } catch {
    return null;
  }
}

/** Takes the folder's lock or throws FolderBusyError naming the holder. */
export function lockDataFolder(
  dataDir: string,
  command: string,
  now = () => new Date().toISOString(),
): FolderLock {
  mkdirSync(dataDir, { recursive: true });
  const db = new Database(join(dataDir, LOCK_FILE), { timeout: 0 });
  try {
    db.pragma('locking_mode = EXCLUSIVE');
    db.exec('CREATE TABLE IF NOT EXISTS held (pid INTEGER, at TEXT)');
    db.prepare('INSERT INTO held (pid, at) VALUES (?, ?)').run(process.pid, now()); // takes and keeps the exclusive lock
    db.exec('DELETE FROM held WHERE rowid < (SELECT max(rowid) FROM held)');
  } catch (e) {
    db.close();
    const code = (e as { code?: string }).code;
    if (code === 'SQLITE_BUSY' || code === 'SQLITE_LOCKED')
      throw new FolderBusyError(dataDir, readHolder(dataDir));
    throw e;
  }
  const holder: LockHolder = { pid: process.pid, host: hostname(), startedAt: now(), command };
  writeFileSync(join(dataDir, HOLDER_FILE), `${JSON.stringify(holder)}\n`);
  let held = true;
  return {
    release() {
      if (!held) return;
      held = false;
      rmSync(join(dataDir, HOLDER_FILE), { force: true });
      db.close();
    },
  };
}
