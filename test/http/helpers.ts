import type { FastifyInstance } from 'fastify';
import { buildApp, type AppOptions } from '../../server/http/app.js';
import type { AnalyzeRunner } from '../../server/jobs/pool.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import type { Role } from '../../server/store/users.js';
import { afterAll } from 'vitest';
import { fakeAnalyze } from './fake-analyze.js';
import { openTestStore } from '../support/store.js';

export interface TestApp {
  app: FastifyInstance;
  store: Store;
  tokens: Record<Role, string>;
  auth: (role: Role) => { authorization: string };
}

const opened: TestApp[] = [];

// Every app a test file makes through testApp is closed, and its store with it, when that file's
// tests are done (a test may also close its own earlier; closing twice is harmless).
afterAll(async () => {
  for (const t of opened.splice(0)) {
    await t.app.close();
    await t.store.close();
  }
});

export async function testApp(
  over: Partial<AppOptions> & { analyze?: AnalyzeRunner } = {},
): Promise<TestApp> {
  const store = await openTestStore();
  const tokens = {} as Record<Role, string>;
  for (const role of ['technician', 'engineer', 'auditor', 'admin'] as Role[]) {
    tokens[role] = (await store.users.createToken(SYSTEM_ACTOR, `${role}-1`, role)).token;
  }
  const app = await buildApp({ store, analyze: fakeAnalyze, ...over });
  const t: TestApp = {
    app,
    store,
    tokens,
    auth: (role) => ({ authorization: `Bearer ${tokens[role]}` }),
  };
  opened.push(t);
  await app.ready();
  return t;
}

export const VESSEL_FILE = {
  name: 'T-101',
  shape: { kind: 'vertical-cylinder', diameterM: 3.0 },
  outlet: { boreM: 0.03, elevationM: 0.0 },
  sensor: { zeroElevationM: 0.0 },
};

/** A multipart body built by hand (no client library needed for inject). */
export function multipart(
  files: { field: string; name: string; bytes: Uint8Array }[],
  fields: Record<string, string> = {},
) {
  const boundary = `----efflux${Math.random().toString(16).slice(2)}`;
  const parts: Buffer[] = [];
  for (const [k, v] of Object.entries(fields)) {
    parts.push(
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`),
    );
  }
  for (const f of files) {
    parts.push(
      Buffer.from(
        `--${boundary}\r\nContent-Disposition: form-data; name="${f.field}"; filename="${f.name}"\r\nContent-Type: text/csv\r\n\r\n`,
      ),
    );
    parts.push(Buffer.from(f.bytes));
    parts.push(Buffer.from('\r\n'));
  }
  parts.push(Buffer.from(`--${boundary}--\r\n`));
  return {
    payload: Buffer.concat(parts),
    headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
  };
}

export const GOOD_LOG = Buffer.from('t,level\n0,2.00\n1,1.98\n2,1.96\n3,1.94\n');
