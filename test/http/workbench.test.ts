/**
 * The workbench routes (server/http/routes/workbench.ts): a look at a logger file without storing
 * it, and a stored test's series at full resolution. The reference is the engine itself: what the
 * preview shows must be what a fit of the same bytes uses (analyzeDrainTest).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { buildApp } from '../../server/http/app.js';
import { workbenchRoutes } from '../../server/http/routes/workbench.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import type { FastifyInstance } from 'fastify';
import { multipart } from './helpers.js';
import { openTestStore } from '../support/store.js';

const sample = (name: string) =>
  fileURLToPath(new URL(`../../sample-data/${name}`, import.meta.url));
const LOG = readFileSync(sample('fb1-2026-03-10-preamble.csv'));
const VESSEL = JSON.parse(readFileSync(sample('backwash-tank-fb1.vessel.json'), 'utf8'));

let app: FastifyInstance;
let store: Store;
const auth: Record<string, { authorization: string }> = {};

beforeAll(async () => {
  store = await openTestStore();
  for (const role of ['technician', 'engineer', 'auditor'] as const) {
    auth[role] = {
      authorization: `Bearer ${(await store.users.createToken(SYSTEM_ACTOR, `${role}-1`, role)).token}`,
    };
  }
  // the real engine in-process: the stored test must be one the engine accepts
  app = await buildApp({ store, analyze: async (req) => analyzeDrainTest(req) });
  // app.ts may already register the module; add it when it does not
  if (!app.hasRoute({ method: 'POST', url: '/api/vessels/:id/inspect' }))
    await app.register(workbenchRoutes);
  await app.ready();
});
afterAll(async () => {
  await app.close();
  await store.close();
});

let made = 0;
async function vesselId(): Promise<number> {
  const r = await app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: auth.engineer,
    payload: { ...VESSEL, name: `${VESSEL.name} #${++made}` },
  });
  expect(r.statusCode).toBe(201);
  return r.json().id;
}

function inspect(id: number, fields: Record<string, string> = {}, who = 'technician') {
  const m = multipart([{ field: 'log', name: 'fb1.csv', bytes: LOG }], fields);
  return app.inject({
    method: 'POST',
    url: `/api/vessels/${id}/inspect`,
    headers: { ...auth[who], ...m.headers },
    payload: m.payload,
  });
}

describe('POST /api/vessels/:id/inspect', () => {
  it('shows what a fit of the same bytes would read and choose, and stores nothing', async () => {
    const id = await vesselId();
    const before = await store.tests.count();
    const r = await inspect(id);
    expect(r.statusCode).toBe(200);
    const body = r.json();
    const outcome = analyzeDrainTest({
      log: { bytes: LOG, fileName: 'fb1.csv' },
      vessel: VESSEL,
      settings: {},
    });
    expect(body.detected.window.startS).toBe(outcome.fit.window.startS);
    expect(body.detected.window.endS).toBe(outcome.fit.window.endS);
    expect(body.series.timeS.length).toBe((outcome.fit.read as { samples: number }).samples);
    expect(body.series.levelM.length).toBe(body.series.timeS.length);
    expect(body.series.keep.length).toBe(body.series.timeS.length);
    expect(body.series.t0).toBe((outcome.fit.read as { t0: string }).t0);
    // the first lines are the file's own text (the sample opens with metadata lines)
    expect(body.head.lines[0]).toBe(LOG.toString('utf8').split(/\r?\n/)[0]);
    expect(await store.tests.count()).toBe(before);
  });

  it('applies a stated window and reading settings', async () => {
    const id = await vesselId();
    const r = await inspect(id, { window: '300..1500' });
    expect(r.statusCode).toBe(200);
    expect(r.json().detected.window.startS).toBeGreaterThanOrEqual(300);
    expect(r.json().detected.window.endS).toBeLessThanOrEqual(1500);
    const bad = await inspect(id, { levelColumn: 'no-such-column' });
    expect(bad.statusCode).toBe(422);
    expect(bad.headers['content-type']).toContain('application/problem+json');
  });

  it('is refused to an auditor (reads only)', async () => {
    const id = await vesselId();
    expect((await inspect(id, {}, 'auditor')).statusCode).toBe(403);
  });
});

describe('GET /api/tests/:id/series', () => {
  it('reads the stored bytes again at full resolution', async () => {
    const id = await vesselId();
    const m = multipart([{ field: 'log', name: 'fb1.csv', bytes: LOG }]);
    const up = await app.inject({
      method: 'POST',
      url: `/api/vessels/${id}/tests`,
      headers: { ...auth.technician, ...m.headers },
      payload: m.payload,
    });
    expect(up.statusCode).toBe(201);
    const testId = up.json().test.id;
    const r = await app.inject({
      method: 'GET',
      url: `/api/tests/${testId}/series`,
      headers: auth.auditor,
    });
    expect(r.statusCode).toBe(200);
    const direct = await inspect(id);
    expect(r.json().series.timeS).toEqual(direct.json().series.timeS);
    expect(r.json().series.levelM).toEqual(direct.json().series.levelM);
  });
});
