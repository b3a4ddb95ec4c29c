import { defineConfig } from 'vitest/config';

// Two projects: every test on SQLite (the default engine), and the store, HTTP and workbench
// browser suites again on PostgreSQL. The `postgres` project's globalSetup uses the server named
// by EFFLUX_TEST_DATABASE_URL or starts a throw-away one (scripts/postgres-for-tests.mjs); each
// test file, and each store a test opens, gets its own new database. Only one engine:
// `npx vitest run --project sqlite` (or `--project postgres`).
const POSTGRES_SUITES = [
  'test/store/**/*.test.ts',
  'test/http/**/*.test.ts',
  'test/e2e/workbench.test.ts',
];
// Tests of the PostgreSQL engine itself (no SQLite form)
const POSTGRES_ONLY = ['test/**/postgres-*.test.ts'];

export default defineConfig({
  test: {
    // ENGINE_VERSION's hash of server/core, brought up to date before the tests run the engine from source
    globalSetup: ['./scripts/engine-version.mjs'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
    projects: [
      {
        extends: true,
        test: {
          name: 'sqlite',
          include: ['test/**/*.test.ts'],
          exclude: POSTGRES_ONLY,
          // a server named for the PostgreSQL project must not turn these into PostgreSQL runs
          env: { EFFLUX_TEST_DATABASE_URL: '' },
        },
      },
      {
        extends: true,
        test: {
          name: 'postgres',
          include: [...POSTGRES_SUITES, ...POSTGRES_ONLY],
          // tests of SQLite's own pieces (its Sql engine, its migrations), which open SQLite directly
          exclude: [
            'test/store/sql.test.ts',
            'test/store/migrate.test.ts',
            'test/store/migrate-records.test.ts',
            // a server process on a data folder's SQLite file, read directly (the two-instance
            // kill test on PostgreSQL is its own file)
            'test/http/process.test.ts',
          ],
          globalSetup: ['./scripts/postgres-for-tests.mjs'],
          setupFiles: ['./test/support/postgres-setup.ts'],
        },
      },
    ],
  },
});
