/**
 * The demo's monthly histories (sample-data/history/, invented) loaded the service's way — demo
 * loader, the real analysis, approvals and the cleaning event from the manifest — and read back
 * through the trend API. The truth each history was made with (server/demo/history.ts) is known,
 * so the forecast can be checked against the true crossing date.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { trueCrossingMs } from '../../server/demo/history.js';
import { HISTORIES } from '../../server/demo/scenario.js';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/http/app.js';
import { loadDemo } from '../../server/jobs/demo.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { openTestStore } from '../support/store.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const NOW = Date.UTC(2026, 3, 1); // three weeks after the last monthly test
let store: Store;
let app: FastifyInstance;
let auth: { authorization: string };
const outletOf: Record<string, number> = {};

async function get(url: string) {
  const res = await app.inject({ method: 'GET', url, headers: auth });
  expect(res.statusCode, url).toBe(200);
  return res;
}

beforeAll(async () => {
  store = await openTestStore();
  const report = await loadDemo(
    store,
    async (req) => analyzeDrainTest(req),
    join(root, 'sample-data/manifest.json'),
  );
  expect(report.skipped).toEqual([]);
  expect(report.events).toBe(1);
  auth = {
    authorization: `Bearer ${(await store.users.createToken(SYSTEM_ACTOR, 'reader', 'auditor')).token}`,
  };
  app = await buildApp({
    store,
    analyze: async (req) => analyzeDrainTest(req),
    clockMs: () => NOW,
  });
  for (const h of HISTORIES) {
    const id = (await store.vessels.findId('Kestrel Fen works (fictional)', h.vessel.name))!;
    outletOf[h.logPrefix] = (await store.vessels.get(id)).outlets[0].id;
  }
}, 60_000);

afterAll(async () => {
  await app.close();
  await store.close();
});

describe('demo histories through the trend API', () => {
  it('every monthly test was approved: 18 points per outlet', async () => {
    for (const p of ['fd1', 'fd2', 'fd3']) {
      const b = (await get(`/api/outlets/${outletOf[p]}/trend`)).json();
      expect(b.epochs.flatMap((e: { series: unknown[] }) => e.series)).toHaveLength(18);
    }
  });

  it('the fouling outlet is forecast, and the 95 % interval holds the true crossing date', async () => {
    const b = (await get(`/api/outlets/${outletOf.fd2}/trend`)).json();
    const f = b.epochs[0].forecast;
    expect(f.status).toBe('forecast');
    // the threshold is relative to the measured baseline; the truth line reaches that same level on:
    const truth = trueCrossingMs(HISTORIES[1], f.thresholdValue)!;
    expect(f.lowerMs).toBeLessThanOrEqual(truth);
    expect(f.upperMs).toBeGreaterThanOrEqual(truth);
    expect(b.epochs[0].area.slopePctPerYearInterval95.lower).toBeLessThanOrEqual(-4);
    expect(b.epochs[0].area.slopePctPerYearInterval95.upper).toBeGreaterThanOrEqual(-4);
    expect(b.status.status).toMatch(/drifting|action due soon/);
  });

  it('the clean outlet gets no forecast and says why', async () => {
    const b = (await get(`/api/outlets/${outletOf.fd1}/trend`)).json();
    const f = b.epochs[0].forecast;
    expect(['not-significant', 'away-from-threshold']).toContain(f.status);
    expect(f.crossingMs).toBeNull();
    expect(f.reason).toMatch(/not distinguishable from no change|points away from/);
    expect(b.status.status).toBe('steady');
    expect(b.status.daysToThreshold).toBeNull();
  });

  it('the blocked outlet: the step is flagged at the tenth test, the cleaning starts a new epoch', async () => {
    const b = (await get(`/api/outlets/${outletOf.fd3}/trend`)).json();
    expect(b.epochs).toHaveLength(2);
    const [before, after] = b.epochs;
    expect(before.series).toHaveLength(13);
    expect(before.step.flagged).toBe(true);
    expect(before.step.direction).toBe('drop');
    expect(before.step.fitId).toBe(before.series[9].fitId);
    expect(after.startedBy).toMatchObject({ kind: 'cleaned', at: '2025-10-24T00:00:00.000Z' });
    expect(after.baselineFitId).toBe(after.series[0].fitId);
    expect(after.series[0].changePct).toBe(0);
    expect(after.current).toBe(true);
    expect(b.status.epochIndex).toBe(1);
    const csv = (await get(`/api/outlets/${outletOf.fd3}/history.csv`)).body
      .trimEnd()
      .split('\r\n');
    expect(csv.slice(1).map((l) => l.split(',')[4])).toEqual([
      ...Array(13).fill('0'),
      ...Array(5).fill('1'),
    ]);
  });

  it('the fleet puts the fouling outlet first (the only one with a date)', async () => {
    const f = (await get('/api/fleet')).json();
    expect(f.items[0].outletId).toBe(outletOf.fd2);
    expect(f.items.find((i: { outletId: number }) => i.outletId === outletOf.fd1).status).toBe(
      'steady',
    );
  });
});
