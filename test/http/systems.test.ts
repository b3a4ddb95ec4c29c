/**
 * Connected vessels over HTTP: the joint fit from a multipart upload of the sample two-vessel
 * system, the steady state and the linear model from its answer, and refusals naming the field.
 * Truth: sample-data/systems/truth.json (the invented scenario's recorded Cd, server/demo/systems.ts).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STANDARD_GRAVITY_MS2 } from '../../server/core/units/index.js';
import { multipart, testApp, type TestApp } from './helpers.js';

const dir = fileURLToPath(new URL('../../sample-data/systems/', import.meta.url));
const file = (name: string) => readFileSync(dir + name);
const truth = JSON.parse(readFileSync(dir + 'truth.json', 'utf8')).tests.find(
  (t: { system: string }) => t.system === 'filter-chain.system.json',
).truth;

let t: TestApp;
let fit: Record<string, any>;

function fitBody(
  extra: { field: string; name: string; bytes: Uint8Array }[] = [],
  fields: Record<string, string> = {},
) {
  return multipart(
    [
      {
        field: 'system',
        name: 'filter-chain.system.json',
        bytes: file('filter-chain.system.json'),
      },
      { field: 'log:FT1', name: 'ft1-2026-04-07.csv', bytes: file('ft1-2026-04-07.csv') },
      ...extra,
    ],
    fields,
  );
}

beforeAll(async () => {
  t = await testApp();
  const m = fitBody([
    { field: 'log:BT2', name: 'bt2-2026-04-07.csv', bytes: file('bt2-2026-04-07.csv') },
  ]);
  const res = await t.app.inject({
    method: 'POST',
    url: '/api/systems/fit',
    headers: { ...t.auth('technician'), ...m.headers },
    payload: m.payload,
  });
  expect(res.statusCode, res.body).toBe(200);
  fit = res.json();
});
afterAll(async () => t.app.close());

describe('POST /api/systems/fit', () => {
  it('fits both outlets; the recorded Cd lies inside each 95 % interval', () => {
    expect(fit.format).toBe('efflux-system-fit');
    expect(fit.converged).toBe(true);
    for (const id of ['FT1', 'BT2']) {
      const [lo, hi] = fit.outlets[id].dischargeCoefficient.ci95;
      expect(truth[id].dischargeCoefficient, id).toBeGreaterThan(lo);
      expect(truth[id].dischargeCoefficient, id).toBeLessThan(hi);
    }
  });

  it('draws each log with its fitted curve, thinned, close to the readings', () => {
    expect(fit.drawing.map((d: { id: string }) => d.id).sort()).toEqual(['BT2', 'FT1']);
    for (const d of fit.drawing) {
      expect(d.timeS.length).toBeLessThanOrEqual(600);
      expect(d.fittedM.length).toBe(d.levelM.length);
      // the sample logs carry 1.5 mm noise (truth.json): the curve stays within a few cm of every reading
      const worst = Math.max(...d.levelM.map((y: number, i: number) => Math.abs(y - d.fittedM[i])));
      expect(worst).toBeLessThan(0.02);
    }
  });

  it('refuses a missing log, naming the field, and a non-multipart body', async () => {
    const m = fitBody();
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('engineer'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode).toBe(422);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.json().field).toBe('log:BT2');
    const j = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: t.auth('engineer'),
      payload: { a: 1 },
    });
    expect(j.statusCode).toBe(415);
  });

  it('refuses an unknown field and a log for a vessel the system does not have', async () => {
    const bad = fitBody([{ field: 'log:BT2', name: 'b.csv', bytes: file('bt2-2026-04-07.csv') }], {
      colour: 'red',
    });
    const r1 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('engineer'), ...bad.headers },
      payload: bad.payload,
    });
    expect(r1.statusCode).toBe(400);
    const stray = fitBody([{ field: 'log:XX9', name: 'x.csv', bytes: file('bt2-2026-04-07.csv') }]);
    const r2 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('engineer'), ...stray.headers },
      payload: stray.payload,
    });
    expect(r2.statusCode).toBe(422);
    expect(r2.json().field).toBe('log:XX9');
  });
});

describe('POST /api/systems/steady and /linearize', () => {
  const Q = 0.0025; // 2.5 L/s

  it('steady: free chain, each outlet passes the inflow; H1/H2 = (Cd·a2 / Cd·a1)² (the series relation)', async () => {
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/steady',
      headers: t.auth('auditor'),
      payload: { system: fit, inflows: [{ flow: '2.5L/s' }] },
    });
    expect(res.statusCode, res.body).toBe(200);
    const s = res.json();
    expect(s.inflowM3S.FT1).toBeCloseTo(Q, 12);
    for (const id of ['FT1', 'BT2']) expect(s.vessels[id].outflowM3S).toBeCloseTo(Q, 9);
    const a1 = fit.outlets.FT1.effectiveAreaM2.value;
    const a2 = fit.outlets.BT2.effectiveAreaM2.value;
    expect(s.vessels.FT1.headM / s.vessels.BT2.headM).toBeCloseTo((a2 / a1) ** 2, 6);
    // Torricelli: Q = Cd·a·sqrt(2 g H)
    expect(a1 * Math.sqrt(2 * STANDARD_GRAVITY_MS2 * s.vessels.FT1.headM)).toBeCloseTo(Q, 9);
    expect(s.vessels.FT1.levelM.standardUncertainty).toBeGreaterThan(0);
    expect(s.covariance).toHaveLength(2);
  });

  it('linearize: the bottom vessel’s own time constant is 2·A·sqrt(H0)/(Cd·a·sqrt(2g)); text block and CSV come along', async () => {
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/linearize',
      headers: t.auth('technician'),
      payload: { system: fit, inflows: [{ to: 'FT1', flow: 0.0025 }] },
    });
    expect(res.statusCode, res.body).toBe(200);
    const lm = res.json();
    const i = lm.ids.indexOf('BT2');
    const st = (
      await t.app.inject({
        method: 'POST',
        url: '/api/systems/steady',
        headers: t.auth('technician'),
        payload: { system: fit, inflows: [{ flow: '2.5 L/s' }] },
      })
    ).json();
    const area = (Math.PI * 1.2 ** 2) / 4; // BT2 is an upright cylinder 1.2 m across (filter-chain.system.json)
    const tau =
      (2 * area * Math.sqrt(st.vessels.BT2.headM)) /
      (fit.outlets.BT2.effectiveAreaM2.value * Math.sqrt(2 * STANDARD_GRAVITY_MS2));
    expect(lm.timeConstantsS[i].value).toBeCloseTo(tau, 3);
    expect(lm.timeConstantsS[i].standardUncertainty).toBeGreaterThan(0);
    expect(lm.text).toContain('per m in BT2, 1/s');
    expect(lm.text).not.toMatch(/\[[^\]]*;[^\]]*\]|eye\(/s);
    expect(lm.csv.split('\n')[0]).toBe(
      'matrix,row,column,value,standard_uncertainty,ci95_low,ci95_high',
    );
  });

  it('refuses a bad flow and an unknown vessel, naming the field; a system file without Cd·a asks for it', async () => {
    const r1 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/steady',
      headers: t.auth('engineer'),
      payload: { system: fit, inflows: [{ flow: 'lots' }] },
    });
    expect(r1.statusCode).toBe(422);
    expect(r1.json().field).toBe('inflows.0.flow');
    const r2 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/linearize',
      headers: t.auth('engineer'),
      payload: { system: fit, inflows: [{ to: 'NOPE', flow: '1L/s' }] },
    });
    expect(r2.statusCode).toBe(422);
    expect(r2.json().field).toBe('inflows.0.to');
    const bare = JSON.parse(file('filter-chain.system.json').toString('utf8'));
    const r3 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/steady',
      headers: t.auth('engineer'),
      payload: { system: bare, inflows: [{ flow: '1L/s' }] },
    });
    expect(r3.statusCode).toBe(422);
    expect(r3.json().field).toBe('vessels.0.effectiveAreaM2');
    const r4 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/steady',
      headers: t.auth('engineer'),
      payload: { inflows: [] },
    });
    expect(r4.statusCode).toBe(400);
    expect(r4.json().errors[0].path).toBe('body.system');
  });
});

describe('POST /api/systems/fit with a logged inflow (the pump-fed sample, sample-data/systems/truth.json)', () => {
  const wash = JSON.parse(readFileSync(dir + 'truth.json', 'utf8')).tests.find(
    (x: { system: string }) => x.system === 'wash-transfer.system.json',
  );
  const parts = (withFlow: boolean) =>
    multipart([
      {
        field: 'system',
        name: 'wash-transfer.system.json',
        bytes: file('wash-transfer.system.json'),
      },
      { field: 'log:WT4', name: wash.logs.WT4, bytes: file(wash.logs.WT4) },
      { field: 'log:HT5', name: wash.logs.HT5, bytes: file(wash.logs.HT5) },
      ...(withFlow
        ? [
            {
              field: `inflow:${wash.inflowLog.to}`,
              name: 'pump-2026-04-09.csv',
              bytes: file('pump-2026-04-09.csv'),
            },
          ]
        : []),
    ]);

  it('reads the flow log sent as "inflow:ID" and recovers both outlets within 0.5 %', async () => {
    const m = parts(true);
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode, res.body).toBe(200);
    const j = res.json();
    for (const id of ['WT4', 'HT5']) {
      expect(
        Math.abs(
          j.outlets[id].dischargeCoefficient.value / wash.truth[id].dischargeCoefficient - 1,
        ),
        id,
      ).toBeLessThan(0.005);
    }
  });

  it('without the flow log: 422 naming the missing field', async () => {
    const m = parts(false);
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode).toBe(422);
    expect(res.json().field).toBe(`inflow:${wash.inflowLog.to}`);
  });
});
