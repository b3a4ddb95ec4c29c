/**
 * `efflux trend` against a data folder filled through the service (stand-in analysis stating
 * each month's Cd·a; invented history): the CLI answers what the API answers.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { simulateFoulingHistory } from '../../server/core/trend/index.js';
import { buildApp } from '../../server/http/app.js';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { multipart } from '../http/helpers.js';
import { logFor, trendAnalyze } from '../http/trend-fake.js';
import { root } from './run-cli.js';
import { openTestStore } from '../support/store.js';

const AS_OF = '2025-09-01';

function efflux(dataDir: string, args: string[]) {
  const r = spawnSync(
    process.execPath,
    ['--import', 'tsx', join(root, 'server/cli/main.ts'), ...args],
    {
      cwd: root,
      encoding: 'utf8',
      env: { ...process.env, NO_COLOR: '1', EFFLUX_DATA_DIR: dataDir },
    },
  );
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

let dataDir: string;
let outletId: number;
let apiTrend: any;
let apiFleet: any;

beforeAll(async () => {
  dataDir = mkdtempSync(join(tmpdir(), 'efflux-trend-cli-'));
  const store = await openTestStore({ dataDir });
  const token = (await store.users.createToken(SYSTEM_ACTOR, 'eng', 'engineer')).token;
  const auth = { authorization: `Bearer ${token}` };
  // four eyes: a technician uploads, the engineer approves
  const tech = {
    authorization: `Bearer ${(await store.users.createToken(SYSTEM_ACTOR, 'tech', 'technician')).token}`,
  };
  const app = await buildApp({ store, analyze: trendAnalyze, clockMs: () => Date.parse(AS_OF) });
  const v = (
    await app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: auth,
      payload: {
        name: 'CLI tank',
        site: 'east',
        shape: { kind: 'vertical-cylinder', diameterM: 2 },
        outlet: { boreM: 0.03, elevationM: 0, actionThreshold: 0.9 },
        sensor: { zeroElevationM: 0 },
      },
    })
  ).json();
  outletId = v.outlets[0].id;
  const h = simulateFoulingHistory({
    seed: 3,
    months: 16,
    startMs: Date.UTC(2024, 3, 1),
    baselineAreaM2: 4e-4,
    driftPctPerYear: -5,
    relU: 0.004,
  });
  for (const f of h.fits) {
    const m = multipart(
      [{ field: 'log', name: 'l.csv', bytes: logFor(f.effectiveAreaM2, f.effectiveAreaU) }],
      { testedAt: new Date(f.testedAtMs).toISOString() },
    );
    const up = await app.inject({
      method: 'POST',
      url: `/api/vessels/${v.id}/tests`,
      headers: { ...tech, ...m.headers },
      payload: m.payload,
    });
    await app.inject({
      method: 'POST',
      url: `/api/fits/${up.json().fit.id}/review`,
      headers: auth,
      payload: { decision: 'approve' },
    });
  }
  apiTrend = (
    await app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/trend?asOf=${AS_OF}`,
      headers: auth,
    })
  ).json();
  apiFleet = (
    await app.inject({ method: 'GET', url: `/api/fleet?asOf=${AS_OF}`, headers: auth })
  ).json();
  await app.close();
  await store.close();
}, 60_000);

describe('efflux trend', () => {
  it('--json prints the same trend as the API', () => {
    const r = efflux(dataDir, ['trend', String(outletId), '--json', '--as-of', AS_OF]);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual(apiTrend);
  }, 30_000);

  it('text: status, reason, the table of tests and a picture', () => {
    const r = efflux(dataDir, ['trend', String(outletId), '--as-of', AS_OF]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(`status: ${apiTrend.status.status} — ${apiTrend.status.reason}`);
    expect(r.stdout).toContain('threshold: -10 %');
    expect(r.stdout.split('\n').filter((l) => / baseline$/.test(l))).toHaveLength(1);
    expect(r.stdout).toMatch(/-10 % \|-+/); // the threshold row of the picture
  }, 30_000);

  it('--csv prints the history; --fleet --json the fleet; a bad id is refused with exit 2', () => {
    const csv = efflux(dataDir, ['trend', String(outletId), '--csv', '--as-of', AS_OF]);
    expect(csv.code).toBe(0);
    expect(csv.stdout.split('\r\n').filter(Boolean)).toHaveLength(17);
    const fleet = efflux(dataDir, ['trend', '--fleet', '--json', '--as-of', AS_OF]);
    expect(fleet.code, fleet.stderr).toBe(0);
    const f = JSON.parse(fleet.stdout);
    expect(f.items).toEqual(apiFleet.items);
    const bad = efflux(dataDir, ['trend', '999']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/outlet 999 not found/);
  }, 30_000);
});
