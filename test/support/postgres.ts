import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { migratePostgres } from '../../server/store/postgres-migrate.js';
import { PostgresSql } from '../../server/store/postgres-sql.js';

/** The server the PostgreSQL tests use (set by test/support/postgres-setup.ts in that project). */
export function postgresServerUrl(): string {
  const url = process.env.EFFLUX_TEST_DATABASE_URL;
  if (!url)
    throw new Error(
      'EFFLUX_TEST_DATABASE_URL is not set: run the PostgreSQL tests through `npx vitest run --project postgres`, ' +
        'which starts a throw-away server (PostgreSQL 15 installed) or uses the one that variable names',
    );
  return url;
}

/** The URL of another database on the same server. */
export function databaseUrl(serverUrl: string, database: string): string {
  const u = new URL(serverUrl);
  u.pathname = `/${database}`;
  return u.toString();
}

export interface TestDatabase {
  name: string;
  url: string;
  /** Drops it (closing whatever is still connected). */
  drop(): Promise<void>;
}

/** Names of this run's databases: the globalSetup drops them all at the end on a server it did not start. */
const runId = () => process.env.EFFLUX_TEST_RUN_ID ?? 'x';

async function onServer<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: postgresServerUrl() });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

/** A new database on the test server: empty, or a copy of `template`. */
export async function createTestDatabase(template?: string): Promise<TestDatabase> {
  const name = `efflux_t_${runId()}_${randomBytes(5).toString('hex')}`;
  await onServer((c) =>
    c.query(`CREATE DATABASE ${name}${template ? ` TEMPLATE ${template}` : ''}`),
  );
  return {
    name,
    url: databaseUrl(postgresServerUrl(), name),
    drop: () =>
      onServer((c) => c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`)).then(() => {}),
  };
}

/**
 * This run's database with every migration applied, made once (the first test file to ask makes
 * it, the others wait on an advisory lock) and copied for each store: CREATE DATABASE … TEMPLATE
 * takes a quarter of a second where creating and migrating takes about twice that.
 */
async function migratedTemplate(): Promise<string> {
  const name = `efflux_tpl_${runId()}`;
  await onServer(async (c) => {
    await c.query("SELECT pg_advisory_lock(hashtextextended('efflux.test-template', 0))");
    try {
      const has = await c.query('SELECT 1 FROM pg_database WHERE datname = $1', [name]);
      if (has.rowCount) return;
      await c.query(`CREATE DATABASE ${name}`);
      const sql = new PostgresSql({
        connectionString: databaseUrl(postgresServerUrl(), name),
        max: 2,
      });
      try {
        await migratePostgres(sql);
      } finally {
        await sql.close(); // a template is copied only while nobody is connected to it
      }
    } finally {
      await c.query("SELECT pg_advisory_unlock(hashtextextended('efflux.test-template', 0))");
    }
  });
  return name;
}

/** A new database at the current schema. */
export async function createMigratedTestDatabase(): Promise<TestDatabase> {
  return createTestDatabase(await migratedTemplate());
}

/** A new database with every migration applied, and a Sql on it. */
export async function migratedTestDatabase(): Promise<TestDatabase & { sql: PostgresSql }> {
  const db = await createMigratedTestDatabase();
  const sql = new PostgresSql({ connectionString: db.url, max: 4 });
  return {
    ...db,
    sql,
    async drop() {
      await sql.close();
      await db.drop();
    },
  };
}
