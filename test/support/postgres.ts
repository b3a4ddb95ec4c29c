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

/** A new, empty database on the test server, named efflux_t_<random>. */
export async function createTestDatabase(): Promise<TestDatabase> {
  const server = postgresServerUrl();
  const name = `efflux_t_${randomBytes(6).toString('hex')}`;
  const admin = new pg.Client({ connectionString: server });
  await admin.connect();
  try {
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.end();
  }
  return {
    name,
    url: databaseUrl(server, name),
    async drop() {
      const c = new pg.Client({ connectionString: server });
      await c.connect();
      try {
        await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      } finally {
        await c.end();
      }
    },
  };
}

/** A new database with every migration applied, and a Sql on it. */
export async function migratedTestDatabase(): Promise<TestDatabase & { sql: PostgresSql }> {
  const db = await createTestDatabase();
  const sql = new PostgresSql({ connectionString: db.url, max: 4 });
  await migratePostgres(sql.pool);
  return {
    ...db,
    sql,
    async drop() {
      await sql.close();
      await db.drop();
    },
  };
}
