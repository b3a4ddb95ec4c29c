/**
 * Uploads through the real engine (server/core/analyze.ts) with the shared bench inputs
 * (../shared/bench: a vessel file and a logger file). Checks the service's side of the contract:
 * the stored fit is exactly what the engine computes from the stored bytes, settings and vessel,
 * and a refusal keeps its file/line/field across the worker boundary.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { ENGINE_VERSION } from '../../server/core/version.js';
import { createAnalysisPool } from '../../server/jobs/pool.js';
import { multipart, testApp } from './helpers.js';

const bench = (name: string) => fileURLToPath(new URL(`../../../shared/bench/${name}`, import.meta.url));
const vesselFile = JSON.parse(readFileSync(bench('vcyl-86400.vessel.json'), 'utf8'));
// the first 12 000 readings (20 minutes at 10 Hz) keep the test quick
const log = Buffer.from(readFileSync(bench('vcyl-86400.csv'), 'utf8').split('\n').slice(0, 12_001).join('\n') + '\n');

const pool = createAnalysisPool({ threads: 1 });
afterAll(() => pool.close());

const withoutTiming = (fit: Record<string, unknown>) => ({ ...fit, timing: undefined });

describe('uploads through the real engine in the worker pool', () => {
  it('stores the fit the engine computes from the stored bytes, settings and vessel', async () => {
    const t = await testApp({ analyze: pool.run });
    const v = await t.app.inject({ method: 'POST', url: '/api/vessels', headers: t.auth('engineer'), payload: vesselFile });
    expect(v.statusCode).toBe(201);
    const m = multipart([{ field: 'log', name: 'vcyl.csv', bytes: log }], { fitInflow: 'false' });
    const res = await t.app.inject({ method: 'POST', url: `/api/vessels/${v.json().id}/tests`, headers: { ...t.auth('technician'), ...m.headers }, payload: m.payload });
    expect(res.statusCode, res.body).toBe(201);
    const { test, fit } = res.json();
    expect(fit.engineVersion).toBe(ENGINE_VERSION);
    expect(fit.result.engineVersion).toBe(ENGINE_VERSION);
    const raw = t.store.tests.rawBytes(test.sha256);
    const again = analyzeDrainTest({ log: { bytes: raw, fileName: test.fileName }, vessel: fit.vessel, settings: fit.settings });
    expect(withoutTiming(fit.result)).toEqual(withoutTiming(JSON.parse(JSON.stringify(again.fit))));
    expect(test.detected).toEqual(JSON.parse(JSON.stringify(again.detected)));
  });

  it('a file the engine refuses: 422 naming the file, nothing kept', async () => {
    const t = await testApp({ analyze: pool.run });
    const v = await t.app.inject({ method: 'POST', url: '/api/vessels', headers: t.auth('engineer'), payload: vesselFile });
    const bad = Buffer.from('timestamp,level_m\n2026-04-02T06:00:00Z,abc\n2026-04-02T06:00:01Z,def\n');
    const m = multipart([{ field: 'log', name: 'garbage.csv', bytes: bad }]);
    const res = await t.app.inject({ method: 'POST', url: `/api/vessels/${v.json().id}/tests`, headers: { ...t.auth('technician'), ...m.headers }, payload: m.payload });
    expect(res.statusCode, res.body).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.json().file).toBe('garbage.csv');
    expect(t.store.tests.count()).toBe(0);
    expect(t.store.db.prepare('SELECT count(*) FROM raw_files').pluck().get()).toBe(0);
  });
});
