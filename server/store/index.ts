import { AuditLog } from './audit.js';
import type { StoreContext } from './context.js';
import { openDatabase, openMemoryDatabase, type Db } from './db.js';
import { EventRepo } from './events.js';
import { FitRepo } from './fits.js';
import { LiveRepo } from './live.js';
import { join } from 'node:path';
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

export interface Store {
  db: Db;
  /** The one asynchronous way to the database (see sql.ts). */
  sql: Sql;
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
  /** Room kept on disk for the compensating step after a full disk (file stores only). */
  reserve: DiskReserve | null;
  close(): void;
}

export interface StoreOptions {
  /** Folder holding efflux.sqlite; omitted → an in-memory database (tests). */
  dataDir?: string;
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

/** Opens the database, brings its schema up to date and builds the repositories on it. */
export function openStore(opts: StoreOptions = {}): Store {
  const db = opts.dataDir ? openDatabase(opts.dataDir) : openMemoryDatabase();
  try {
    migrate(db, opts.migrationsDir, {
      // VACUUM INTO: a consistent copy, synchronous (the backup API is asynchronous and opening is not)
      beforeFirst: opts.dataDir
        ? (from, to) =>
            db
              .prepare('VACUUM INTO ?')
              .run(
                join(
                  opts.dataDir!,
                  preMigrationBackupName(
                    from,
                    to,
                    (opts.now ?? (() => new Date().toISOString()))(),
                  ),
                ),
              )
        : undefined,
    });
  } catch (e) {
    db.close();
    throw e;
  }
  const reserve = opts.dataDir ? new DiskReserve(opts.dataDir, opts.reserveBytes) : null;
  reserve?.ensure(); // false on a full disk: made again after the next compensating step
  const audit = new AuditLog(db);
  const sql = new SqliteSql(db);
  const c: StoreContext = {
    db,
    sql,
    audit,
    now: opts.now ?? (() => new Date().toISOString()),
    foreign: new ForeignWrites(db),
  };
  const tests = new TestRepo(c);
  const sites = new SiteRepo(c);
  return {
    db,
    sql,
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
    reserve,
    close: () => db.close(),
  };
}

export { SYSTEM_ACTOR, type Actor } from './audit.js';
export { ConflictError, DuplicateUploadError, ForbiddenError, NotFoundError } from './errors.js';
export { MigrationError, NewerSchemaError } from './migrate.js';
export { ROLES, actorOf, type Person, type Role, type TokenInfo, type User } from './users.js';
