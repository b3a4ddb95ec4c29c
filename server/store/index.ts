import { AuditLog } from './audit.js';
import type { StoreContext } from './context.js';
import { openDatabase, openMemoryDatabase } from './db.js';
import type { StoreEngine } from './engine.js';
import { EventRepo } from './events.js';
import { FitRepo } from './fits.js';
import { LiveRepo } from './live.js';
import { NameRepo } from './names.js';
import { join } from 'node:path';
import { databasePath } from './maintenance.js';
import { migrate } from './migrate.js';
import { PreferenceRepo } from './preferences.js';
import { ForeignWrites } from './read-cache.js';
import { DiskReserve } from './reserve.js';
import { ServiceMetaRepo } from './service-meta.js';
import { SiteRepo } from './sites.js';
import type { Sql } from './sql.js';
import { SqliteSql } from './sqlite-sql.js';
import { TestRepo } from './tests.js';
import { TrendRepo } from './trends.js';
import { UserRepo } from './users.js';
import { VesselRepo } from './vessels.js';
import { VesselRevisionRepo } from './vessel-revisions.js';

export interface Store {
  /** The one asynchronous way to the database (see sql.ts); repositories use nothing else. */
  sql: Sql;
  /** Which engine holds the database and what is particular to it (engine.ts). */
  engine: StoreEngine;
  audit: AuditLog;
  vessels: VesselRepo;
  tests: TestRepo;
  fits: FitRepo;
  events: EventRepo;
  users: UserRepo;
  sites: SiteRepo;
  trends: TrendRepo;
  live: LiveRepo;
  meta: ServiceMetaRepo;
  /** A person's display choices (units); async on sql. */
  preferences: PreferenceRepo;
  /** Saved revisions of vessel files and the revision each fit used (migration 007). */
  vesselRevisions: VesselRevisionRepo;
  /** Outlets and sites as people name them (CLI look-ups). */
  names: NameRepo;
  /** Room kept on disk for the compensating step after a full disk (file stores only). */
  reserve: DiskReserve | null;
  close(): Promise<void>;
}

export interface StoreOptions {
  /** Folder holding efflux.sqlite; omitted (and no databaseUrl) → an in-memory database (tests). */
  dataDir?: string;
  /** postgres://… : the PostgreSQL engine instead of SQLite (EFFLUX_DATABASE_URL). */
  databaseUrl?: string;
  /** ISO-8601 clock; injected by tests. */
  now?: () => string;
  migrationsDir?: string;
  /** Size of the data folder's reserve file (default 4 MiB). */
  reserveBytes?: number;
}

/** The copy a migration takes first, in the data folder, named with both schema versions. */
export function preMigrationBackupName(from: number, to: number, at: string): string {
  return `efflux-before-schema-${from}-to-${to}-${at.replace(/[-:.]/g, '').slice(0, 15)}.sqlite`;
}

/** What an engine hands the repositories: its Sql, its description, and its foreign-commit count. */
interface OpenedEngine {
  sql: Sql;
  engine: StoreEngine;
  foreign: ForeignWrites;
}

/** SQLite (better-sqlite3): a file in the data folder, or memory; migrated before use. */
async function openSqlite(opts: StoreOptions, now: () => string): Promise<OpenedEngine> {
  const dataDir = opts.dataDir ?? null;
  const db = dataDir ? openDatabase(dataDir) : openMemoryDatabase();
  const sql = new SqliteSql(db);
  try {
    await migrate(sql, opts.migrationsDir, {
      exec: (script) => sql.exec(script),
      // VACUUM INTO: a consistent copy, taken before anything is changed
      beforeFirst: dataDir
        ? async (from, to) => {
            await sql.run('VACUUM INTO ?', [
              join(dataDir, preMigrationBackupName(from, to, now())),
            ]);
          }
        : undefined,
    });
  } catch (e) {
    db.close();
    throw e;
  }
  // changes on this connection only when another one has committed; read outside any transaction
  const dataVersion = db.prepare('PRAGMA data_version').pluck();
  return {
    sql,
    engine: { kind: 'sqlite', path: dataDir ? databasePath(dataDir) : null, dataDir },
    foreign: new ForeignWrites(() => dataVersion.get() as number),
  };
}

/** Opens the database, brings its schema up to date and builds the repositories on it. */
export async function openStore(opts: StoreOptions = {}): Promise<Store> {
  const now = opts.now ?? (() => new Date().toISOString());
  if (opts.databaseUrl) {
    // The PostgreSQL engine plugs in here (migrations from migrations/postgres/), returning an
    // OpenedEngine like openSqlite's; until then this build refuses the setting plainly.
    throw new Error(
      'this build has no PostgreSQL engine: unset EFFLUX_DATABASE_URL to use the data folder',
    );
  }
  const { sql, engine, foreign } = await openSqlite(opts, now);
  const reserve = opts.dataDir ? new DiskReserve(opts.dataDir, opts.reserveBytes) : null;
  reserve?.ensure(); // false on a full disk: made again after the next compensating step
  const audit = new AuditLog(sql);
  const c: StoreContext = { sql, audit, now, foreign };
  const tests = new TestRepo(c);
  const sites = new SiteRepo(c);
  return {
    sql,
    engine,
    audit,
    vessels: new VesselRepo(c),
    tests,
    fits: new FitRepo(c, tests, sites),
    events: new EventRepo(c),
    users: new UserRepo(c, sites),
    sites,
    trends: new TrendRepo(c),
    live: new LiveRepo(c),
    meta: new ServiceMetaRepo(c),
    preferences: new PreferenceRepo(c),
    vesselRevisions: new VesselRevisionRepo(c),
    names: new NameRepo(c),
    reserve,
    close: () => sql.close(),
  };
}

export { SYSTEM_ACTOR, type Actor } from './audit.js';
export { ConflictError, DuplicateUploadError, ForbiddenError, NotFoundError } from './errors.js';
export { MigrationError, NewerSchemaError } from './migrate.js';
export { databaseFile, type StoreEngine } from './engine.js';
export { ROLES, actorOf, type Person, type Role, type TokenInfo, type User } from './users.js';
