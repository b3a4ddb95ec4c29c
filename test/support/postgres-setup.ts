// setupFiles of the vitest project `postgres`: the server's URL from the globalSetup
// (scripts/postgres-for-tests.mjs) into EFFLUX_TEST_DATABASE_URL, or every test file fails with
// the reason and how to start one (never a silent skip).
import { beforeAll, inject } from 'vitest';

declare module 'vitest' {
  export interface ProvidedContext {
    postgresUrl?: string;
    postgresProblem?: string;
    postgresRunId?: string;
  }
}

const url = inject('postgresUrl');
process.env.EFFLUX_TEST_RUN_ID = inject('postgresRunId') ?? 'x';
if (url) process.env.EFFLUX_TEST_DATABASE_URL = url;
else {
  const problem = inject('postgresProblem') ?? 'no server was named or started';
  beforeAll(() => {
    throw new Error(`the PostgreSQL tests have no server: ${problem}`);
  });
}
