import type { AuditLog } from './audit.js';
import type { Db } from './db.js';
import type { ForeignWrites } from './read-cache.js';
import type { Sql } from './sql.js';

/** What every repository shares: one connection, the audit log, and the clock (injected for tests). */
export interface StoreContext {
  db: Db;
  /** The asynchronous interface every repository moves to (issue 14); the same connection as db. */
  sql: Sql;
  audit: AuditLog;
  now: () => string;
  /** Tells the read caches when another connection has committed. */
  foreign: ForeignWrites;
}

export function json(value: unknown): string | null {
  return value === undefined || value === null ? null : JSON.stringify(value);
}

export function parse<T = unknown>(text: string | null): T | null {
  return text === null ? null : (JSON.parse(text) as T);
}
