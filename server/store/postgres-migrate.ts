/**
 * Migrations on PostgreSQL: migrations/postgres/NNN_words.sql (the same numbers and names as the
 * SQLite files) through the one runner (migrate.ts: the same schema_migrations table, each file in
 * its own transaction, the same refusals and messages). Several instances may start at once: the
 * run holds a session advisory lock, so one applies the files while the others wait and then
 * find nothing left to do.
 */
import { defaultMigrationsDir, migrate } from './migrate.js';
import type { PostgresSql } from './postgres-sql.js';

/** migrations/postgres/ beside the SQLite files. */
export function defaultPostgresMigrationsDir(): string {
  return `${defaultMigrationsDir()}postgres/`;
}

/** The lock every migrating instance takes (hashtextextended of this name). */
export const MIGRATION_LOCK = 'efflux.migrate';

/** Brings a PostgreSQL database's schema up to date; returns the files applied. */
export function migratePostgres(
  sql: PostgresSql,
  dir = defaultPostgresMigrationsDir(),
): Promise<string[]> {
  return migrate(sql, dir, {
    exec: (script) => sql.exec(script),
    alone: (fn) => sql.withSessionLock(MIGRATION_LOCK, fn),
  });
}
