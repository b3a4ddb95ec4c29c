/**
 * Trend routes through the service with a stand-in analysis whose Cd·a each test states:
 * the trend's shape, the CSV, the fleet order and filters, the threshold setting, refusals.
 * Histories are invented (simulateFoulingHistory), as the trend core's own tests do.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { simulateFoulingHistory } from '../../server/core/trend/index.js';
import { multipart, testApp, type TestApp } from './helpers.js';
import { logFor, trendAnalyze } from './trend-fake.js';

const DAY = 86_400_000;
const START = Date.UTC(2024, 0, 15);
const NOW = Date.UTC(2025, 7, 1);

let t: TestApp;

async function vessel(name: string, outletExtra: Record<string, unknown> = {}) {
  const body = {
    name,
    site: 'north',
    shape: { kind: 'vertical-cylinder', diameterM: 2 },
    outlet: { boreM: 0.03, elevationM: 0, ...outletExtra },
    sensor: { zeroElevationM: 0 },
  };
  const res = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: body,
  });
  expect(res.statusCode).toBe(201);
  return res.json() as { id: number; outlets: { id: number }[] };
}

async function upload(vesselId: number, cda: number, u: number, testedAtMs: number) {
  const m = multipart([{ field: 'log', name: 'log.csv', bytes: logFor(cda, u) }], {
    testedAt: new Date(testedAtMs).toISOString(),
  });
  const res = await t.app.inject({
    method: 'POST',
    url: `/api/vessels/${vesselId}/tests`,
    headers: { ...t.auth('technician'), ...m.headers },
    payload: m.payload,
  });
  expect(res.statusCode).toBe(201);
  return res.json().fit.id as number;
}

async function approve(fitId: number) {
  const res = await t.app.inject({
    method: 'POST',
    url: `/api/fits/${fitId}/review`,
    headers: t.auth('engineer'),
    payload: { decision: 'approve' },
  });
  expect(res.statusCode).toBe(200);
}

let fouling: { vesselId: number; outletId: number; fitIds: number[] };
let steady: { vesselId: number; outletId: number };

beforeAll(async () => {
  t = await testApp({ analyze: trendAnalyze, clockMs: () => NOW });
  // 18 monthly tests losing 6 %/year (invented); u = 0.4 % of Cd·a
  const h = simulateFoulingHistory({
    seed: 7,
    months: 18,
    startMs: START,
    baselineAreaM2: 4e-4,
    driftPctPerYear: -6,
    relU: 0.004,
  });
  const v = await vessel('Fouling tank', { actionThreshold: 0.9 });
  const fitIds: number[] = [];
  for (const f of h.fits) {
    const id = await upload(v.id, f.effectiveAreaM2, f.effectiveAreaU, f.testedAtMs);
    await approve(id);
    fitIds.push(id);
  }
  // one draft never approved: it must not count
  await upload(v.id, 1e-4, 1e-6, START + 400 * DAY);
  fouling = { vesselId: v.id, outletId: v.outlets[0].id, fitIds };
  const s = simulateFoulingHistory({
    seed: 8,
    months: 10,
    startMs: START,
    baselineAreaM2: 4e-4,
    driftPctPerYear: 0,
    relU: 0.004,
  });
  const v2 = await vessel('Steady tank');
  for (const f of s.fits)
    await approve(await upload(v2.id, f.effectiveAreaM2, f.effectiveAreaU, f.testedAtMs));
  steady = { vesselId: v2.id, outletId: v2.outlets[0].id };
  await vessel('Untested tank');
});

afterAll(async () => {
  await t.app.close();
});

describe('GET /api/outlets/:id/trend', () => {
  it('serves the approved series with line, band, threshold and forecast', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${fouling.outletId}/trend`,
      headers: t.auth('auditor'),
    });
    expect(res.statusCode).toBe(200);
    const b = res.json();
    expect(b.asOf).toBe(new Date(NOW).toISOString());
    expect(b.threshold).toMatchObject({ pct: -10, fraction: 0.9 });
    expect(b.epochs).toHaveLength(1);
    const ep = b.epochs[0];
    expect(ep.series.map((p: { fitId: number }) => p.fitId)).toEqual(fouling.fitIds); // the draft is left out
    expect(ep.series[0].isBaseline).toBe(true);
    expect(ep.thresholdM2).toBeCloseTo(ep.series[0].effectiveAreaM2 * 0.9, 12);
    expect(ep.area.slopePctPerYear).toBeLessThan(0);
    expect(ep.areaBand.length).toBeGreaterThan(2);
    for (const p of ep.areaBand) expect(p.lower).toBeLessThanOrEqual(p.upper);
    expect(ep.forecast.status).toBe('forecast');
    expect(ep.forecast.lowerMs).toBeLessThan(ep.forecast.crossingMs);
    expect(ep.forecast.upperMs).toBeGreaterThan(ep.forecast.crossingMs);
    expect(['drifting', 'action due soon']).toContain(b.status.status);
    expect(b.status.daysToThreshold).toBeCloseTo((ep.forecast.crossingMs - NOW) / DAY, 6);
  });

  it('asOf moves "now": a date past the crossing reads past threshold', async () => {
    const first = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${fouling.outletId}/trend`,
        headers: t.auth('auditor'),
      })
    ).json();
    const after = new Date(first.epochs[0].forecast.crossingMs + 30 * DAY).toISOString();
    const res = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${fouling.outletId}/trend?asOf=${after}`,
      headers: t.auth('auditor'),
    });
    expect(res.json().status.status).toBe('past threshold');
  });

  it('an outlet with no approved fit says the next test sets the baseline', async () => {
    const v = (
      await t.app.inject({
        method: 'GET',
        url: '/api/vessels?limit=500',
        headers: t.auth('auditor'),
      })
    ).json();
    const untested = v.items.find((x: { name: string }) => x.name === 'Untested tank').outlets[0]
      .id;
    const b = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${untested}/trend`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(b.status.status).toBe('not enough tests');
    expect(b.threshold).toMatchObject({ pct: -10, fraction: null });
  });

  it('refuses an unknown outlet (404) and a bad asOf (400), as problem+json', async () => {
    const a = await t.app.inject({
      method: 'GET',
      url: '/api/outlets/99999/trend',
      headers: t.auth('auditor'),
    });
    expect(a.statusCode).toBe(404);
    expect(a.headers['content-type']).toMatch(/^application\/problem\+json/);
    const b = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${fouling.outletId}/trend?asOf=yesterday`,
      headers: t.auth('auditor'),
    });
    expect(b.statusCode).toBe(400);
    expect(b.json().errors[0].path).toBe('querystring.asOf');
  });
});

describe('GET /api/outlets/:id/history.csv', () => {
  it('one row per approved fit with uncertainties and epoch, readable back to the same numbers', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${fouling.outletId}/history.csv`,
      headers: t.auth('technician'),
    });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(
      /attachment; filename="Fouling_tank-main-history\.csv"/,
    );
    const lines = res.body.trimEnd().split('\r\n');
    const head = lines[0].split(',');
    expect(head).toEqual([
      'fit_id',
      'test_id',
      'tested_at',
      'approved_at',
      'epoch',
      'epoch_started_by',
      'is_baseline',
      'effective_area_m2',
      'u_effective_area_m2',
      'discharge_coefficient',
      'u_discharge_coefficient',
      'change_from_baseline_pct',
    ]);
    expect(lines).toHaveLength(1 + fouling.fitIds.length);
    const trend = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${fouling.outletId}/trend`,
        headers: t.auth('technician'),
      })
    ).json();
    lines.slice(1).forEach((line, i) => {
      const row = Object.fromEntries(line.split(',').map((v, k) => [head[k], v]));
      const p = trend.epochs[0].series[i];
      expect(Number(row.fit_id)).toBe(p.fitId);
      expect(Number(row.effective_area_m2)).toBe(p.effectiveAreaM2); // full precision, not rounded
      expect(Number(row.u_effective_area_m2)).toBe(p.effectiveAreaU);
      expect(Number(row.u_discharge_coefficient)).toBe(p.dischargeCoefficientU);
      expect(row.epoch).toBe('0');
      expect(row.is_baseline).toBe(i === 0 ? 'true' : 'false');
    });
  });
});

describe('GET /api/fleet', () => {
  it('lists every outlet, soonest threshold first, with counts; filters by site and status', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: '/api/fleet',
      headers: t.auth('auditor'),
    });
    expect(res.statusCode).toBe(200);
    const b = res.json();
    expect(b.total).toBe(3);
    expect(b.items[0].outletId).toBe(fouling.outletId); // the only one with a forecast
    expect(b.items.map((i: { vesselName: string }) => i.vesselName)).toContain('Steady tank');
    const trend = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${fouling.outletId}/trend`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(b.items[0].status).toBe(trend.status.status);
    expect(b.items[0].daysToThreshold).toBeCloseTo(trend.status.daysToThreshold, 6);
    expect(Object.values(b.counts as Record<string, number>).reduce((a, c) => a + c, 0)).toBe(3);
    const st = await t.app.inject({
      method: 'GET',
      url: `/api/fleet?status=${encodeURIComponent('not enough tests')}`,
      headers: t.auth('auditor'),
    });
    expect(st.json().items.map((i: { vesselName: string }) => i.vesselName)).toEqual([
      'Untested tank',
    ]);
    const none = await t.app.inject({
      method: 'GET',
      url: '/api/fleet?site=elsewhere',
      headers: t.auth('auditor'),
    });
    expect(none.json().total).toBe(0);
    const bad = await t.app.inject({
      method: 'GET',
      url: '/api/fleet?status=fine',
      headers: t.auth('auditor'),
    });
    expect(bad.statusCode).toBe(422);
    expect(bad.json().field).toBe('status');
  });

  it('the cached status, brought forward in time, agrees with a fresh computation', async () => {
    await t.app.inject({ method: 'GET', url: '/api/fleet', headers: t.auth('auditor') }); // cache filled at NOW
    for (const days of [10, 200, 800]) {
      const asOf = new Date(NOW + days * DAY).toISOString();
      const fleet = (
        await t.app.inject({
          method: 'GET',
          url: `/api/fleet?asOf=${asOf}`,
          headers: t.auth('auditor'),
        })
      ).json();
      for (const id of [fouling.outletId, steady.outletId]) {
        const fresh = (
          await t.app.inject({
            method: 'GET',
            url: `/api/outlets/${id}/trend?asOf=${asOf}`,
            headers: t.auth('auditor'),
          })
        ).json().status;
        const item = fleet.items.find((i: { outletId: number }) => i.outletId === id);
        expect(item.status, `${id} at +${days} d`).toBe(fresh.status);
        if (fresh.daysToThreshold === null) expect(item.daysToThreshold).toBeNull();
        else expect(item.daysToThreshold).toBeCloseTo(fresh.daysToThreshold, 6);
      }
    }
  });
});

describe('PUT /api/outlets/:id/settings', () => {
  it('sets the action threshold in the vessel file (a vessel update, audited) and the trend follows', async () => {
    const res = await t.app.inject({
      method: 'PUT',
      url: `/api/outlets/${steady.outletId}/settings`,
      headers: t.auth('engineer'),
      payload: { actionThreshold: 0.95 },
    });
    expect(res.statusCode).toBe(200);
    expect(res.json().threshold.pct).toBe(-5);
    const v = (
      await t.app.inject({
        method: 'GET',
        url: `/api/vessels/${steady.vesselId}`,
        headers: t.auth('engineer'),
      })
    ).json();
    expect(v.spec.outlet.actionThreshold).toBe(0.95);
    expect(v.revision).toBe(2);
    const trend = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${steady.outletId}/trend`,
        headers: t.auth('engineer'),
      })
    ).json();
    expect(trend.threshold.pct).toBe(-5);
    const fleet = (
      await t.app.inject({ method: 'GET', url: '/api/fleet', headers: t.auth('engineer') })
    ).json();
    expect(
      fleet.items.find((i: { outletId: number }) => i.outletId === steady.outletId).thresholdPct,
    ).toBe(-5);
    const audit = (
      await t.app.inject({
        method: 'GET',
        url: `/api/audit?entityType=vessel&entityId=${steady.vesselId}`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(audit.items.map((e: { action: string }) => e.action)).toContain('vessel.update');
    const cleared = await t.app.inject({
      method: 'PUT',
      url: `/api/outlets/${steady.outletId}/settings`,
      headers: t.auth('engineer'),
      payload: { actionThreshold: null },
    });
    expect(cleared.json().threshold).toMatchObject({ pct: -10, fraction: null });
  });

  it('refuses a threshold outside (0, 1) and unknown fields (400)', async () => {
    for (const payload of [
      { actionThreshold: 1 },
      { actionThreshold: 0 },
      { actionThreshold: 0.9, soon: 3 },
    ]) {
      const res = await t.app.inject({
        method: 'PUT',
        url: `/api/outlets/${steady.outletId}/settings`,
        headers: t.auth('engineer'),
        payload,
      });
      expect(res.statusCode, JSON.stringify(payload)).toBe(400);
    }
  });
});
