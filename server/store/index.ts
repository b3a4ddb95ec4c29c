import { AuditLog } from './audit.js';
import type { StoreContext } from './context.js';
import { openDatabase, openMemoryDatabase } from './db.js';
import type { StoreEngine } from './engine.js';
import { EventRepo } from './events.js';
import { FitRepo } from './fits.js';
import { JointFitRepo } from './joint-fits.js';
import { LiveRepo } from './live.js';
import { NameRepo } from './names.js';
import { join } from 'node:path';
import { databasePath } from './maintenance.js';
import { migrate } from './migrate.js';
import { PreferenceRepo } from './preferences.js';
import { ForeignWrites } from './read-cache.js';
import { redactDatabaseUrl } from './database-url.js';
import { type AnalysisClaims, LocalClaims, PostgresClaims } from './claims.js';
import { DiskReserve } from './reserve.js';
import { ServiceMetaRepo } from './service-meta.js';
import { ScheduleRepo } from './schedule.js';
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
  /** Joint fits of connected vessels (migration 009; asynchronous). */
  jointFits: JointFitRepo;
  events: EventRepo;
  users: UserRepo;
  sites: SiteRepo;
  /** Sites' clocks and test intervals, outlets' own intervals (async). */
  schedule: ScheduleRepo;
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
  /** Which instance analyses a pending test (claims.ts). */
  claims: AnalysisClaims;
  close(): Promise<void>;
}

export interface StoreOptions {
  /** Folder holding efflux.sqlite; omitted (and no databaseUrl) → an in-memory database (tests). */
  dataDir?: string;
  /** postgres://… : the PostgreSQL engine instead of SQLite (EFFLUX_DATABASE_URL). */
  databaseUrl?: string;
  /** PostgreSQL: connections in the pool (default 10). */
  poolSize?: number;
  /** PostgreSQL: an idle pooled connection failed (told, never thrown). */
  onDatabaseError?: (e: Error) => void;
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
  claims: AnalysisClaims;
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
    claims: new LocalClaims(),
  };
}

/**
 * PostgreSQL (node-postgres, loaded only when asked for): a pool on the database, migrated from
 * migrations/postgres/ (instances starting together take turns). Another instance's commits are
 * seen through write_counter (migration 001), read before each cached answer is served.
 */
async function openPostgres(url: string, opts: StoreOptions): Promise<OpenedEngine> {
  const { PostgresSql } = await import('./postgres-sql.js');
  const { migratePostgres } = await import('./postgres-migrate.js');
  const sql = new PostgresSql({
    connectionString: url,
    max: opts.poolSize,
    onIdleError: opts.onDatabaseError,
  });
  try {
    // a migrations folder given for SQLite (tests) holds PostgreSQL's files in postgres/
    await migratePostgres(
      sql,
      opts.migrationsDir ? join(opts.migrationsDir, 'postgres/') : undefined,
    );
  } catch (e) {
    await sql.close();
    throw e;
  }
  return {
    sql,
    engine: { kind: 'postgres', url: redactDatabaseUrl(url) },
    foreign: new ForeignWrites(async () =>
      Number(await sql.value('SELECT n FROM write_counter WHERE id = 1')),
    ),
    claims: new PostgresClaims(() => sql.dedicatedClient()),
  };
}

/** Opens the database, brings its schema up to date and builds the repositories on it. */
export async function openStore(opts: StoreOptions = {}): Promise<Store> {
  const now = opts.now ?? (() => new Date().toISOString());
  const { sql, engine, foreign, claims } = opts.databaseUrl
    ? await openPostgres(opts.databaseUrl, opts)
    : await openSqlite(opts, now);
  const reserve =
    opts.dataDir && !opts.databaseUrl ? new DiskReserve(opts.dataDir, opts.reserveBytes) : null;
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
    jointFits: new JointFitRepo(c),
    events: new EventRepo(c),
    users: new UserRepo(c, sites),
    sites,
    schedule: new ScheduleRepo(c),
    trends: new TrendRepo(c),
    live: new LiveRepo(c),
    meta: new ServiceMetaRepo(c),
    preferences: new PreferenceRepo(c),
    vesselRevisions: new VesselRevisionRepo(c),
    names: new NameRepo(c),
    reserve,
    claims,
    close: async () => {
      await claims.close();
      await sql.close();
    },
  };
}

export { SYSTEM_ACTOR, type Actor } from './audit.js';
export { ConflictError, DuplicateUploadError, ForbiddenError, NotFoundError } from './errors.js';
export { MigrationError, NewerSchemaError } from './migrate.js';
export { databaseFile, type StoreEngine } from './engine.js';
export { ROLES, actorOf, type Person, type Role, type TokenInfo, type User } from './users.js';
