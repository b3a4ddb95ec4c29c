import { AsyncLocalStorage } from 'node:async_hooks';
import type { Statement } from 'better-sqlite3';
import type { Db } from './db.js';
import type { Sql, SqlParams, SqlRunResult, SqlValue } from './sql.js';

/**
 * The Sql interface over one better-sqlite3 connection. better-sqlite3 is synchronous, so each
 * call completes before its promise is returned; what needs care is the transaction: while one
 * runs (possibly across awaits), calls from outside it wait for it to end, so no other request
 * reads its uncommitted rows or slips a statement into it.
 */
export class SqliteSql implements Sql {
  readonly dialect = 'sqlite' as const;
  private readonly statements = new Map<string, Statement<unknown[]>>();
  private readonly scope = new AsyncLocalStorage<true>();
  /** Resolves when the open transaction ends; null when none is open. */
  private busy: Promise<void> | null = null;

  constructor(readonly db: Db) {}

  private stmt(sql: string): Statement<unknown[]> {
    let s = this.statements.get(sql);
    if (!s) {
      s = this.db.prepare<unknown[]>(sql);
      if (this.statements.size > 2000) this.statements.clear();
      this.statements.set(sql, s);
    }
    return s;
  }

  async lock(_name: string): Promise<void> {
    if (!this.inTx()) throw new Error('lock() outside a transaction');
  }

  inTx(): boolean {
    return this.scope.getStore() === true;
  }

  async all<T>(sql: string, params?: SqlParams): Promise<T[]> {
    while (this.busy && !this.inTx()) await this.busy;
    return this.stmt(sql).all(...args(params)) as T[];
  }

  async get<T>(sql: string, params?: SqlParams): Promise<T | undefined> {
    while (this.busy && !this.inTx()) await this.busy;
    return this.stmt(sql).get(...args(params)) as T | undefined;
  }

  async value<T>(sql: string, params?: SqlParams): Promise<T | undefined> {
    while (this.busy && !this.inTx()) await this.busy;
    const s = this.stmt(sql);
    const row = s.raw(true).get(...args(params)) as unknown[] | undefined;
    s.raw(false);
    return row === undefined ? undefined : (row[0] as T);
  }

  async run(sql: string, params?: SqlParams): Promise<SqlRunResult> {
    while (this.busy && !this.inTx()) await this.busy;
    return { changes: this.stmt(sql).run(...args(params)).changes };
  }

  async tx<T>(fn: () => Promise<T>): Promise<T> {
    if (this.inTx()) return fn();
    while (this.busy && !this.inTx()) await this.busy;
    let end!: () => void;
    this.busy = new Promise<void>((r) => {
      end = r;
    });
    try {
      this.db.exec('BEGIN IMMEDIATE');
      try {
        const out = await this.scope.run(true, fn);
        this.db.exec('COMMIT');
        return out;
      } catch (e) {
        if (this.db.inTransaction) this.db.exec('ROLLBACK');
        throw e;
      }
    } finally {
      this.busy = null;
      end();
    }
  }

  /** Several statements without parameters (a migration file), in the caller's transaction if any. SQLite only. */
  async exec(script: string): Promise<void> {
    while (this.busy && !this.inTx()) await this.busy;
    this.db.exec(script);
  }

  async close(): Promise<void> {
    while (this.busy && !this.inTx()) await this.busy;
    this.statements.clear();
    if (this.db.open) this.db.close();
  }
}

function args(params: SqlParams | undefined): unknown[] {
  if (params === undefined) return [];
  if (Array.isArray(params)) return (params as SqlValue[]).map(bool);
  const o: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(params)) o[k] = bool(v as SqlValue);
  return [o];
}

/** SQLite has no boolean type: true/false are stored as 1/0, as PostgreSQL's INTEGER columns here. */
function bool(v: SqlValue): unknown {
  return typeof v === 'boolean' ? (v ? 1 : 0) : v;
}
