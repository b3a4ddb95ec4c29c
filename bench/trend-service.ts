/**
 * Trend service benchmark: 5 000 outlets × 10 years of monthly approved fits IN THE DATABASE
 * (invented histories, rows written straight through the store's Sql into a temp folder).
 * Times the fleet status as GET /api/fleet computes it (server/jobs/trend.ts fleetStatus: cached
 * status per outlet, stale ones recomputed) and one outlet's full trend (outletTrendView: SQL read
 * + core + answer shape). Goals: fleet < 200 ms, one outlet < 20 ms.
 * Run: npx tsx bench/trend-service.ts
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DAY_MS } from '../server/core/trend/index.js';
import { seedFleet } from './fleet-seed.js';
import { fleetStatus, outletTrendView } from '../server/jobs/trend.js';
import { openStore } from '../server/store/index.js';

const OUTLETS = Number(process.env.BENCH_OUTLETS ?? 5000),
  MONTHS = 120;
const START = Date.UTC(2015, 0, 1);
const NOW = START + MONTHS * (365.25 / 12) * DAY_MS;
const iso = (ms: number) => new Date(ms).toISOString();

const dir = mkdtempSync(join(tmpdir(), 'efflux-trend-bench-'));
const store = await openStore({ dataDir: dir, now: () => iso(NOW) });
const sql = store.sql;

const seed = () => seedFleet(sql, OUTLETS, MONTHS, START);

async function time(label: string, runs: number, f: () => Promise<unknown>): Promise<number> {
  const ms: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    await f();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  const med = ms[Math.floor(runs / 2)];
  console.log(
    `${label}: median ${med.toFixed(2)} ms, min ${ms[0].toFixed(2)} ms, max ${ms[runs - 1].toFixed(2)} ms over ${runs} runs`,
  );
  return med;
}

try {
  console.log(
    `seeding ${OUTLETS} outlets × ${MONTHS} monthly approved fits (${OUTLETS * MONTHS} fits) into ${dir}`,
  );
  console.log(`seeded in ${((await seed()) / 1000).toFixed(1)} s`);
  const t0 = performance.now();
  const cold = await fleetStatus(store, {}, NOW);
  console.log(
    `fleet, cold (every outlet stale, all recomputed and cached): ${(performance.now() - t0).toFixed(0)} ms (${cold.recomputed} recomputed)`,
  );
  await fleetStatus(store, {}, NOW); // warm up
  const fleetMs = await time(
    'fleet status, warm (cache read, days brought to now, ordered)',
    9,
    () => fleetStatus(store, {}, NOW),
  );
  await time('fleet status, one site and one status word', 9, () =>
    fleetStatus(store, { site: 'site-3', status: ['drifting'] }, NOW),
  );
  let next = NOW;
  await time('fleet status a day later each run (time-overtaken outlets recomputed)', 5, () =>
    fleetStatus(store, {}, (next += DAY_MS)),
  );
  const ids = await store.trends.outletIds();
  const one = ids[ids.length - 1];
  await outletTrendView(store, one, NOW);
  const oneMs = await time('one outlet trend (SQL read, all epochs, bands, answer shape)', 51, () =>
    outletTrendView(store, one, NOW),
  );
  console.log('statuses:', cold.counts);
  console.log(
    `goals: fleet < 200 ms ${fleetMs < 200 ? 'met' : 'MISSED'}, one outlet < 20 ms ${oneMs < 20 ? 'met' : 'MISSED'}`,
  );
} finally {
  await store.close();
  rmSync(dir, { recursive: true, force: true });
}
