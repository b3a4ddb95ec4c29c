import { AuditLog } from './audit.js';
import type { StoreContext } from './context.js';
import { openDatabase, openMemoryDatabase, type Db } from './db.js';
import { EventRepo } from './events.js';
import { FitRepo } from './fits.js';
import { LiveRepo } from './live.js';
import { migrate } from './migrate.js';
import { ForeignWrites } from './read-cache.js';
import { SiteRepo } from './sites.js';
import { TestRepo } from './tests.js';
import { TrendRepo } from './trends.js';
import { UserRepo } from './users.js';
import { VesselRepo } from './vessels.js';

export interface Store {
  db: Db;
  audit: AuditLog;
  vessels: VesselRepo;
  tests: TestRepo;
  fits: FitRepo;
  events: EventRepo;
  users: UserRepo;
  sites: SiteRepo;
  trends: TrendRepo;
  live: LiveRepo;
  close(): void;
}

export interface StoreOptions {
  /** Folder holding efflux.sqlite; omitted → an in-memory database (tests). */
  dataDir?: string;
  /** ISO-8601 clock; injected by tests. */
  now?: () => string;
  migrationsDir?: string;
}

/** Opens the database, brings its schema up to date and builds the repositories on it. */
export function openStore(opts: StoreOptions = {}): Store {
  const db = opts.dataDir ? openDatabase(opts.dataDir) : openMemoryDatabase();
  migrate(db, opts.migrationsDir);
  const audit = new AuditLog(db);
  const c: StoreContext = { db, audit, now: opts.now ?? (() => new Date().toISOString()), foreign: new ForeignWrites(db) };
  const tests = new TestRepo(c);
  const sites = new SiteRepo(c);
  return {
    db,
    audit,
    vessels: new VesselRepo(c),
    tests,
    fits: new FitRepo(c, tests, sites),
    events: new EventRepo(c),
    users: new UserRepo(c, sites),
    sites,
    trends: new TrendRepo(c),
    live: new LiveRepo(c),
    close: () => db.close(),
  };
}

export { SYSTEM_ACTOR, type Actor } from './audit.js';
export { ConflictError, DuplicateUploadError, ForbiddenError, NotFoundError } from './errors.js';
export { ROLES, actorOf, type Person, type Role, type TokenInfo, type User } from './users.js';
