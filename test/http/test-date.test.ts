/**
 * One test date, through the real engine: a demo history log (sample-data/history, invented,
 * elapsed seconds with "Started: 2024-10-07T08:00:00Z" in its preamble) uploaded through the API
 * without testedAt is placed at the date in its own file — in GET /api/outlets/:id/trend, in
 * `efflux trend`, in the vessel's test list, and in the fit and outlet reports (JSON and the PDF's
 * attached report).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { buildApp } from '../../server/http/app.js';
import { readReportFile } from '../../server/render/report-file.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { root } from '../cli/run-cli.js';
import { multipart } from './helpers.js';
import { openTestStore } from '../support/store.js';

const FILE = 'sample-data/history/fd1-2024-10-07.csv';
let store: Store;
let app: Awaited<ReturnType<typeof buildApp>>;
let dataDir: string;
const auth = (t: string) => ({ authorization: `Bearer ${t}` });
let tech = '';
let eng = '';

beforeAll(async () => {
  dataDir = mkdtempSync(join(tmpdir(), 'efflux-date-'));
  store = await openTestStore({ dataDir });
  tech = (await store.users.createToken(SYSTEM_ACTOR, 'tech (fictional)', 'technician')).token;
  eng = (await store.users.createToken(SYSTEM_ACTOR, 'eng (fictional)', 'engineer')).token;
  app = await buildApp({ store, analyze: async (req) => analyzeDrainTest(req) });
  await app.ready();
}, 60_000);

afterAll(async () => {
  await app?.close();
  await store?.close();
});

describe('a history log uploaded without testedAt', () => {
  it('is dated from its own file everywhere the date is shown', async () => {
    const vesselFile = JSON.parse(
      readFileSync(join(root, 'sample-data/filter-drain-fd1.vessel.json'), 'utf8'),
    );
    const v = await app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: auth(eng),
      payload: vesselFile,
    });
    expect(v.statusCode).toBe(201);
    const m = multipart([
      { field: 'log', name: 'fd1-2024-10-07.csv', bytes: readFileSync(join(root, FILE)) },
    ]);
    const up = await app.inject({
      method: 'POST',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: { ...auth(tech), ...m.headers },
      payload: m.payload,
    });
    expect(up.statusCode, up.body).toBe(201);
    const { test, fit } = up.json();
    // the file says "Started: 2024-10-07T08:00:00Z"; the fitted window starts windowStartS later
    const expected = new Date(
      Date.parse('2024-10-07T08:00:00Z') + fit.result.window.startS * 1000,
    ).toISOString();
    expect(test).toMatchObject({ testedAt: expected, testedAtSource: 'log' });
    expect(expected.slice(0, 10)).toBe('2024-10-07');
    expect(
      (
        await app.inject({
          method: 'POST',
          url: `/api/fits/${fit.id}/review`,
          headers: auth(eng),
          payload: { decision: 'approve' },
        })
      ).statusCode,
    ).toBe(200);

    const outletId = v.json().outlets[0].id;
    const trend = await app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/trend`,
      headers: auth(tech),
    });
    expect(trend.json().epochs[0].series[0].testedAt).toBe(expected);
    const list = await app.inject({
      method: 'GET',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: auth(tech),
    });
    expect(list.json().items[0].testedAt).toBe(expected); // what the vessel page shows
    const fitPdf = await app.inject({
      method: 'GET',
      url: `/api/fits/${fit.id}/report.pdf`,
      headers: auth(tech),
    });
    expect(readReportFile(fitPdf.rawPayload, 'fit.pdf').report?.test.testedAt).toBe(expected);
    const outletPdf = await app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/report.pdf`,
      headers: auth(tech),
    });
    expect(readReportFile(outletPdf.rawPayload, 'outlet.pdf').report?.fits[0].testedAt).toBe(
      expected,
    );

    const cli = spawnSync(
      process.execPath,
      ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'trend', String(outletId), '--json'],
      {
        cwd: root,
        encoding: 'utf8',
        env: { ...process.env, NO_COLOR: '1', EFFLUX_DATA_DIR: dataDir },
      },
    );
    expect(cli.status, cli.stderr).toBe(0);
    expect(JSON.parse(cli.stdout).epochs[0].series[0].testedAt).toBe(expected);
  }, 90_000);
});
