import type { AuditLog } from './audit.js';
import type { ForeignWrites } from './read-cache.js';
import type { Sql } from './sql.js';

/** What every repository shares: the database (through Sql only), the audit log, and the clock (injected for tests). */
export interface StoreContext {
  /** The one asynchronous way to the database, whichever engine holds it (sql.ts). */
  sql: Sql;
  audit: AuditLog;
  now: () => string;
  /** Tells the read caches when another connection or instance has committed. */
  foreign: ForeignWrites;
}

export function json(value: unknown): string | null {
  return value === undefined || value === null ? null : JSON.stringify(value);
}

export function parse<T = unknown>(text: string | null): T | null {
  return text === null ? null : (JSON.parse(text) as T);
}
