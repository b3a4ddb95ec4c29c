/**
 * The one way the store talks to its database, whichever engine holds it (SQLite embedded, or
 * PostgreSQL). Every call is asynchronous. SQL is written once with `?` placeholders (or `@name`
 * with an object of parameters); an engine translates them to its own. Where the two dialects
 * differ, a repository asks `sql.dialect` and writes each form beside the other.
 *
 * Transactions: `tx(fn)` runs fn in one transaction. While it runs, every call made through this
 * Sql from inside fn (at any depth: repositories, the audit log) joins that transaction (the
 * engine keeps it in AsyncLocalStorage), so code inside a transaction needs no handle passed
 * down. A tx begun inside another joins the outer one.
 */
export type SqlValue = string | number | bigint | boolean | null | Buffer | Uint8Array;
export type SqlParams = readonly SqlValue[] | Readonly<Record<string, SqlValue>>;

export interface SqlRunResult {
  /** Rows inserted, updated or deleted. */
  changes: number;
}

export type Dialect = 'sqlite' | 'postgres';

export interface Sql {
  readonly dialect: Dialect;
  /** Every row. */
  all<T = Record<string, unknown>>(sql: string, params?: SqlParams): Promise<T[]>;
  /** The first row, or undefined. */
  get<T = Record<string, unknown>>(sql: string, params?: SqlParams): Promise<T | undefined>;
  /** The first column of the first row, or undefined when there is no row. */
  value<T = unknown>(sql: string, params?: SqlParams): Promise<T | undefined>;
  /** A statement that returns no rows (use `RETURNING id` with get() to learn a new id). */
  run(sql: string, params?: SqlParams): Promise<SqlRunResult>;
  /** One transaction (IMMEDIATE on SQLite: the write lock is taken at the start). */
  tx<T>(fn: () => Promise<T>): Promise<T>;
  /**
   * Inside tx(): hold the named exclusive lock until the transaction ends, across every process
   * and instance on this database (the audit chain's appends are serialised by it). SQLite needs
   * nothing (BEGIN IMMEDIATE already admits one writer); PostgreSQL takes pg_advisory_xact_lock.
   */
  lock(name: string): Promise<void>;
  /** True while the caller runs inside tx(). */
  inTx(): boolean;
  close(): Promise<void>;
}

/** `?` → `$1, $2…` and `@name` → `$n` with the values in order (PostgreSQL's placeholders). */
export function toNumberedPlaceholders(
  sql: string,
  params: SqlParams | undefined,
): { text: string; values: SqlValue[] } {
  if (params === undefined) return { text: sql, values: [] };
  if (Array.isArray(params)) {
    let i = 0;
    const text = sql.replace(/'(?:[^']|'')*'|\?/g, (m) => (m === '?' ? `$${++i}` : m));
    return { text, values: [...(params as SqlValue[])] };
  }
  const named = params as Record<string, SqlValue>;
  const order: string[] = [];
  const text = sql.replace(/'(?:[^']|'')*'|@([A-Za-z_]\w*)/g, (m, name: string | undefined) => {
    if (!name) return m;
    if (!(name in named)) throw new Error(`SQL parameter @${name} has no value`);
    let k = order.indexOf(name);
    if (k < 0) k = order.push(name) - 1;
    return `$${k + 1}`;
  });
  return { text, values: order.map((n) => named[n]) };
}
