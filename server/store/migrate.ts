/**
 * Migrations: apply, refuse a newer schema, name a failing statement. The statement splitter is
 * hand-written because neither SQLite's C API for it (sqlite3_complete) nor a splitter is exposed by
 * better-sqlite3; it only ever names a statement, never decides what runs.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Sql } from './sql.js';

/** migrations/ at the project root, found from this file (works from server/ and dist/server/). */
export function defaultMigrationsDir(): string {
  for (const up of ['../../migrations/', '../../../migrations/']) {
    const dir = fileURLToPath(new URL(up, import.meta.url));
    if (existsSync(`${dir}001_initial.sql`)) return dir;
  }
  throw new Error('migrations/ folder not found beside the program');
}

export interface MigrationFile {
  version: number;
  name: string;
  sql: string;
}

/** Files named NNN_words.sql, in numeric order; anything else in the folder is ignored. */
export function readMigrations(dir: string): MigrationFile[] {
  const out: MigrationFile[] = [];
  for (const name of readdirSync(dir)) {
    const m = /^(\d+)_[\w-]+\.sql$/.exec(name);
    if (!m) continue;
    out.push({ version: Number(m[1]), name, sql: readFileSync(`${dir}/${name}`, 'utf8') });
  }
  out.sort((a, b) => a.version - b.version);
  for (let i = 1; i < out.length; i++) {
    if (out[i].version === out[i - 1].version) {
      throw new Error(
        `two migrations share version ${out[i].version}: ${out[i - 1].name}, ${out[i].name}`,
      );
    }
  }
  return out;
}

/** The database was written by a newer build (its schema is past every migration this build has). */
export class NewerSchemaError extends Error {
  constructor(
    readonly databaseVersion: number,
    readonly buildVersion: number,
  ) {
    super(
      `the database is at schema version ${databaseVersion}, newer than this build's ${buildVersion}: ` +
        'run the newer efflux, or restore a backup made for this version (efflux restore FILE)',
    );
    this.name = 'NewerSchemaError';
  }
}

/** A migration failed: the file, the statement (its number and first line) and SQLite's reason. */
export class MigrationError extends Error {
  constructor(
    readonly file: string,
    readonly statement: string | null,
    reason: string,
  ) {
    super(
      `migration ${file} failed${statement ? ` at ${statement}` : ''}: ${reason}; the database was left at the previous version`,
    );
    this.name = 'MigrationError';
  }
}

/** The highest migration applied to this database (0 for a new one). */
export async function schemaVersion(sql: Sql): Promise<number> {
  const has = await sql.value(
    sql.dialect === 'sqlite'
      ? "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'schema_migrations'"
      : "SELECT 1 FROM information_schema.tables WHERE table_schema = current_schema() AND table_name = 'schema_migrations'",
  );
  if (has === undefined) return 0;
  return Number((await sql.value('SELECT max(version) FROM schema_migrations')) ?? 0);
}

/** The highest migration this build carries. */
export function buildSchemaVersion(dir = defaultMigrationsDir()): number {
  return readMigrations(dir).reduce((m, f) => Math.max(m, f.version), 0);
}

/**
 * Splits a migration into statements (quotes, comments and CREATE TRIGGER … END kept whole); used
 * only to name the statement that failed, never to run the file.
 */
export function splitStatements(sql: string): { text: string; line: number }[] {
  const out: { text: string; line: number }[] = [];
  let start = 0;
  let i = 0;
  const push = (end: number) => {
    const raw = sql.slice(start, end);
    const body = raw.replace(/^(\s*--[^\n]*(\n|$))+/, '');
    const text = body.trim();
    if (text) {
      const lead = raw.length - body.trimStart().length;
      out.push({ text, line: sql.slice(0, start + lead).split('\n').length });
    }
    start = end + 1;
  };
  while (i < sql.length) {
    const c = sql[i];
    if (c === "'" || c === '"' || c === '`') {
      const close = sql.indexOf(c, i + 1);
      i = close < 0 ? sql.length : close + 1;
    } else if (c === '-' && sql[i + 1] === '-') {
      const nl = sql.indexOf('\n', i);
      i = nl < 0 ? sql.length : nl + 1;
    } else if (c === '/' && sql[i + 1] === '*') {
      const close = sql.indexOf('*/', i + 2);
      i = close < 0 ? sql.length : close + 2;
    } else if (c === ';') {
      const sofar = sql.slice(start, i).replace(/--[^\n]*/g, '');
      const trigger = /^\s*CREATE\s+(TEMP\s+|TEMPORARY\s+)?TRIGGER\b/i.test(sofar);
      if (!trigger || /\bEND\s*$/i.test(sofar)) push(i);
      i++;
    } else i++;
  }
  push(sql.length);
  return out;
}

/** Runs the file's statements one by one inside a savepoint that is rolled back, to find the one that fails. */
async function locateFailure(hooks: MigrationHooks, m: MigrationFile): Promise<string | null> {
  try {
    let found: string | null = null;
    await hooks.exec('SAVEPOINT efflux_locate');
    try {
      for (const [n, st] of splitStatements(m.sql).entries()) {
        try {
          await hooks.exec(st.text);
        } catch {
          const first = st.text.split('\n')[0].slice(0, 120);
          found = `statement ${n + 1} (line ${st.line}: "${first}")`;
          break;
        }
      }
    } finally {
      await hooks.exec('ROLLBACK TO SAVEPOINT efflux_locate');
      await hooks.exec('RELEASE SAVEPOINT efflux_locate');
    }
    return found;
  } catch {
    return null;
  }
}

/** What differs between engines when migrating. */
export interface MigrationHooks {
  /** Runs a migration file's whole text (several statements, no parameters) in the open transaction. */
  exec(script: string): Promise<void>;
  /** Called once before the first migration of an existing database is applied (the pre-migration backup). */
  beforeFirst?: (fromVersion: number, toVersion: number) => void | Promise<void>;
}

/**
 * Applies every migration newer than the database, each in its own transaction together with
 * its row in schema_migrations, so a failure leaves the database at the previous version.
 * Refuses a database from a newer build (NewerSchemaError). Returns the names applied.
 */
export async function migrate(
  sql: Sql,
  dir = defaultMigrationsDir(),
  hooks: MigrationHooks,
): Promise<string[]> {
  const files = readMigrations(dir);
  const buildVersion = files.reduce((m, f) => Math.max(m, f.version), 0);
  const current = await schemaVersion(sql);
  if (current > buildVersion) throw new NewerSchemaError(current, buildVersion);
  await sql.run(`CREATE TABLE IF NOT EXISTS schema_migrations (
    version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`);
  const done = new Set(
    (await sql.all<{ version: number }>('SELECT version FROM schema_migrations')).map((r) =>
      Number(r.version),
    ),
  );
  const todo = files.filter((m) => !done.has(m.version));
  if (todo.length && current > 0) await hooks.beforeFirst?.(current, buildVersion);
  const applied: string[] = [];
  for (const m of todo) {
    try {
      await sql.tx(async () => {
        await hooks.exec(m.sql);
        await sql.run(
          'INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)',
          [m.version, m.name, new Date().toISOString()],
        );
      });
    } catch (e) {
      const reason = (e as Error).message;
      const where = await sql.tx(() => locateFailure(hooks, m));
      throw new MigrationError(m.name, where, reason);
    }
    applied.push(m.name);
  }
  return applied;
}
