/**
 * Backup, check and restore of a data folder's database (the `efflux backup|check|restore`
 * commands). Backups use SQLite's online backup API (better-sqlite3 `db.backup`) from inside one
 * read transaction, so the copy is the snapshot that transaction sees while the service keeps
 * writing, and the row counts it is checked against are taken in that same snapshot. The copy
 * and restore are SQLite's (a data folder); the check (checkDatabase) reads through Sql and runs
 * on either engine (integrity_check only on SQLite). PostgreSQL is backed up by the operator's
 * pg_dump.
 */
import Database from 'better-sqlite3';
import { copyFileSync, existsSync, renameSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { AuditLog, type ChainReport } from './audit.js';
import { openDatabase, type Db } from './db.js';
import { SqliteSql } from './sqlite-sql.js';
import type { Sql } from './sql.js';
import {
  buildSchemaVersion,
  defaultMigrationsDir,
  NewerSchemaError,
  schemaVersion,
} from './migrate.js';

export const DB_FILE = 'efflux.sqlite';

export function databasePath(dataDir: string): string {
  return join(dataDir, DB_FILE);
}

/** Rows in every table of the schema (names from the catalogue, never from input). */
export async function rowCounts(sql: Sql): Promise<Record<string, number>> {
  const tables = (
    await sql.all<{ name: string }>(
      sql.dialect === 'sqlite'
        ? "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name"
        : "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = current_schema() AND table_type = 'BASE TABLE' ORDER BY table_name",
    )
  ).map((r) => r.name);
  const out: Record<string, number> = {};
  for (const t of tables)
    out[t] = Number(await sql.value(`SELECT count(*) FROM "${t.replace(/"/g, '""')}"`));
  return out;
}

export interface DatabaseCheck {
  ok: boolean;
  integrity: string[];
  schema: { database: number; build: number };
  chain: ChainReport;
  counts: Record<string, number>;
  problems: string[];
}

/** integrity_check (SQLite), the schema version against this build's, and the audit chain. */
export async function checkDatabase(
  sql: Sql,
  migrationsDir = defaultMigrationsDir(),
): Promise<DatabaseCheck> {
  const lines =
    sql.dialect === 'sqlite'
      ? (await sql.all<{ integrity_check: string }>('PRAGMA integrity_check')).map(
          (r) => r.integrity_check,
        )
      : ['ok']; // PostgreSQL checks its pages itself (data checksums); nothing to ask here
  const schema = { database: await schemaVersion(sql), build: buildSchemaVersion(migrationsDir) };
  const chain = await new AuditLog(sql).verify();
  const problems: string[] = [];
  if (!(lines.length === 1 && lines[0] === 'ok'))
    problems.push(`integrity check: ${lines.slice(0, 5).join('; ')}`);
  if (schema.database > schema.build)
    problems.push(new NewerSchemaError(schema.database, schema.build).message);
  if (!chain.ok) problems.push(`audit chain broken at entry ${chain.brokenAt}: ${chain.reason}`);
  return {
    ok: problems.length === 0,
    integrity: lines,
    schema,
    chain,
    counts: await rowCounts(sql),
    problems,
  };
}

/** checkDatabase of an SQLite file, opened without migrating and closed after. */
export async function checkDatabaseFile(
  file: string,
  migrationsDir = defaultMigrationsDir(),
): Promise<DatabaseCheck> {
  const sql = new SqliteSql(openExisting(file));
  try {
    return await checkDatabase(sql, migrationsDir);
  } finally {
    await sql.close();
  }
}

export class NoDatabaseError extends Error {
  constructor(where: string) {
    super(`no efflux database at ${where}`);
    this.name = 'NoDatabaseError';
  }
}

/** Opens an existing database file without migrating it. */
export function openExisting(file: string): Db {
  if (!existsSync(file)) throw new NoDatabaseError(file);
  const db = new Database(file, { fileMustExist: true });
  db.pragma('busy_timeout = 5000');
  return db;
}

export interface BackupReport {
  out: string;
  bytes: number;
  counts: Record<string, number>;
  check: DatabaseCheck;
}

/**
 * Copies the data folder's database to `out` online and checks the copy: integrity_check, the
 * audit chain, and every table's row count equal to the source's in the snapshot copied. The copy
 * is written to `out.partial` and renamed only once it has passed; a failed check leaves no file.
 */
export async function backupDatabase(
  dataDir: string,
  out: string,
  migrationsDir = defaultMigrationsDir(),
): Promise<BackupReport> {
  const file = databasePath(dataDir);
  if (!existsSync(file)) throw new NoDatabaseError(file);
  if (existsSync(out)) throw new BackupRefusedError(`${out} already exists; name a new file`);
  const partial = `${out}.partial`;
  rmSync(partial, { force: true });
  const src = openDatabase(dataDir);
  let counts: Record<string, number>;
  try {
    src.exec('BEGIN'); // a read transaction: its first read fixes the snapshot the backup copies
    counts = await rowCounts(new SqliteSql(src)); // the same connection, inside that transaction
    await src.backup(partial);
    src.exec('COMMIT');
  } catch (e) {
    if (src.inTransaction) src.exec('ROLLBACK');
    rmSync(partial, { force: true });
    throw e;
  } finally {
    src.close();
  }
  const copy = new Database(partial);
  copy.pragma('journal_mode = DELETE'); // one self-contained file, no -wal beside it
  const copySql = new SqliteSql(copy);
  let check: DatabaseCheck;
  try {
    check = await checkDatabase(copySql, migrationsDir);
  } finally {
    await copySql.close();
  }
  const mismatched = Object.keys({ ...counts, ...check.counts }).filter(
    (t) => counts[t] !== check.counts[t],
  );
  if (mismatched.length)
    check.problems.push(
      `row counts differ from the source in ${mismatched.map((t) => `${t} (${counts[t]} vs ${check.counts[t]})`).join(', ')}`,
    );
  if (check.problems.length) {
    rmSync(partial, { force: true });
    throw new BackupCheckError(check.problems);
  }
  renameSync(partial, out);
  const bytes = statSync(out).size;
  return { out, bytes, counts, check };
}

/** The backup was not attempted (the target exists). */
export class BackupRefusedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackupRefusedError';
  }
}

export class BackupCheckError extends Error {
  constructor(readonly problems: string[]) {
    super(`the copy failed its check (${problems.join('; ')}); no backup was written`);
    this.name = 'BackupCheckError';
  }
}

/**
 * Puts a checked backup in place of the folder's database. The caller holds the folder lock. The
 * database replaced is kept beside it (`efflux-replaced-<time>.sqlite`), never deleted.
 */
export async function restoreDatabase(
  dataDir: string,
  backupFile: string,
  at: string,
  migrationsDir = defaultMigrationsDir(),
): Promise<{ check: DatabaseCheck; keptAs: string | null }> {
  const check = await checkDatabaseFile(backupFile, migrationsDir);
  if (!check.ok) throw new BackupCheckError(check.problems);
  const file = databasePath(dataDir);
  let keptAs: string | null = null;
  if (existsSync(file)) {
    const current = openDatabase(dataDir);
    current.pragma('wal_checkpoint(TRUNCATE)');
    current.pragma('journal_mode = DELETE'); // folds the WAL in, so one file holds everything
    current.close();
    keptAs = join(dataDir, `efflux-replaced-${at.replace(/[-:.]/g, '').slice(0, 15)}.sqlite`);
    renameSync(file, keptAs);
  }
  for (const side of ['-wal', '-shm']) rmSync(file + side, { force: true });
  copyFileSync(backupFile, `${file}.partial`);
  renameSync(`${file}.partial`, file);
  return { check, keptAs };
}
