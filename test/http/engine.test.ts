/**
 * Uploads through the real engine (server/core/analyze.ts) with a demo vessel file and logger file
 * from sample-data/ (in the repository). Checks the service's side of the contract:
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

const sample = (name: string) =>
  fileURLToPath(new URL(`../../sample-data/${name}`, import.meta.url));
const vesselFile = JSON.parse(readFileSync(sample('backwash-tank-fb1.vessel.json'), 'utf8'));
// a logger file with metadata lines before its header (65 kB), as it came off the logger
const log = readFileSync(sample('fb1-2026-03-10-preamble.csv'));

const pool = createAnalysisPool({ threads: 1 });
afterAll(() => pool.close());

const withoutTiming = (fit: Record<string, unknown>) => ({ ...fit, timing: undefined });

describe('uploads through the real engine in the worker pool', () => {
  it('stores the fit the engine computes from the stored bytes, settings and vessel', async () => {
    const t = await testApp({ analyze: pool.run });
    const v = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: vesselFile,
    });
    expect(v.statusCode).toBe(201);
    const m = multipart([{ field: 'log', name: 'fb1-2026-03-10-preamble.csv', bytes: log }], {
      fitInflow: 'false',
    });
    const res = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode, res.body).toBe(201);
    const { test, fit } = res.json();
    expect(fit.engineVersion).toBe(ENGINE_VERSION);
    expect(fit.result.engineVersion).toBe(ENGINE_VERSION);
    const raw = await t.store.tests.rawBytes(test.sha256);
    const again = analyzeDrainTest({
      log: { bytes: raw, fileName: test.fileName },
      vessel: fit.vessel,
      settings: fit.settings,
    });
    expect(withoutTiming(fit.result)).toEqual(withoutTiming(JSON.parse(JSON.stringify(again.fit))));
    expect(test.detected).toEqual(JSON.parse(JSON.stringify(again.detected)));
  });

  it('a file the engine refuses: 422 naming the file, nothing kept', async () => {
    const t = await testApp({ analyze: pool.run });
    const v = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: vesselFile,
    });
    const bad = Buffer.from(
      'timestamp,level_m\n2026-04-02T06:00:00Z,abc\n2026-04-02T06:00:01Z,def\n',
    );
    const m = multipart([{ field: 'log', name: 'garbage.csv', bytes: bad }]);
    const res = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode, res.body).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.json().file).toBe('garbage.csv');
    expect(await t.store.tests.count()).toBe(0);
    expect(Number(await t.store.sql.value('SELECT count(*) FROM raw_files'))).toBe(0);
  });
});
