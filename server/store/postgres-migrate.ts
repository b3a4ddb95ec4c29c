/**
 * Migrations on PostgreSQL: migrations/postgres/NNN_words.sql (the same numbers and names as the
 * SQLite files), the same schema_migrations table, the same refusals and messages (migrate.ts).
 * Several instances may start at once: the run holds a session advisory lock, so one applies the
 * files while the others wait and then find nothing left to do.
 */
import type pg from 'pg';
import {
  defaultMigrationsDir,
  type MigrationFile,
  MigrationError,
  NewerSchemaError,
  readMigrations,
  splitStatements,
} from './migrate.js';

/** migrations/postgres/ beside the SQLite files. */
export function defaultPostgresMigrationsDir(): string {
  return `${defaultMigrationsDir()}postgres/`;
}

/** The lock every migrating instance takes (hashtextextended of this name). */
export const MIGRATION_LOCK = 'efflux.migrate';

/** The highest migration applied to this database (0 for a new one). */
export async function postgresSchemaVersion(client: pg.ClientBase | pg.Pool): Promise<number> {
  const has = await client.query("SELECT to_regclass('schema_migrations') IS NOT NULL AS has");
  if (!has.rows[0].has) return 0;
  const r = await client.query('SELECT max(version) AS v FROM schema_migrations');
  return Number(r.rows[0].v ?? 0);
}

/** Runs the file's statements one by one in a transaction that is rolled back, to name the one that fails. */
async function locateFailure(client: pg.ClientBase, m: MigrationFile): Promise<string | null> {
  try {
    let found: string | null = null;
    await client.query('BEGIN');
    try {
      for (const [n, st] of splitStatements(m.sql, 'postgres').entries()) {
        try {
          await client.query(st.text);
        } catch {
          const first = st.text.split('\n')[0].slice(0, 120);
          found = `statement ${n + 1} (line ${st.line}: "${first}")`;
          break;
        }
      }
    } finally {
      await client.query('ROLLBACK');
    }
    return found;
  } catch {
    return null;
  }
}

/**
 * Applies every migration newer than the database, each file in its own transaction together
 * with its row in schema_migrations, so a failure leaves the database at the previous version.
 * Refuses a database from a newer build (NewerSchemaError). Returns the names applied.
 */
export async function migratePostgres(
  pool: pg.Pool,
  dir = defaultPostgresMigrationsDir(),
): Promise<string[]> {
  const files = readMigrations(dir);
  const buildVersion = files.reduce((m, f) => Math.max(m, f.version), 0);
  const client = await pool.connect();
  let broken = false;
  try {
    await client.query('SELECT pg_advisory_lock(hashtextextended($1, 0))', [MIGRATION_LOCK]);
    try {
      const current = await postgresSchemaVersion(client);
      if (current > buildVersion) throw new NewerSchemaError(current, buildVersion);
      await client.query(`CREATE TABLE IF NOT EXISTS schema_migrations (
        version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`);
      const done = new Set(
        (await client.query<{ version: number }>('SELECT version FROM schema_migrations')).rows.map(
          (r) => r.version,
        ),
      );
      const applied: string[] = [];
      for (const m of files.filter((f) => !done.has(f.version))) {
        try {
          await client.query('BEGIN');
          await client.query(m.sql); // the simple protocol: the whole file in one round trip
          await client.query(
            'INSERT INTO schema_migrations (version, name, applied_at) VALUES ($1, $2, $3)',
            [m.version, m.name, new Date().toISOString()],
          );
          await client.query('COMMIT');
        } catch (e) {
          await client.query('ROLLBACK');
          throw new MigrationError(m.name, await locateFailure(client, m), (e as Error).message);
        }
        applied.push(m.name);
      }
      return applied;
    } finally {
      await client.query('SELECT pg_advisory_unlock(hashtextextended($1, 0))', [MIGRATION_LOCK]);
    }
  } catch (e) {
    // a connection lost mid-run is not handed out again (its session lock died with it)
    if (!(e instanceof MigrationError) && !(e instanceof NewerSchemaError)) broken = true;
    throw e;
  } finally {
    client.release(broken);
  }
}
