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
import { DAY_MS, simulateFoulingHistory } from '../server/core/trend/index.js';
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
const newId = async (text: string, params: (string | number | null)[]) =>
  Number(await sql.value(`${text} RETURNING id`, params));

async function seed() {
  const t0 = performance.now();
  const sha = 'b'.repeat(64);
  await sql.tx(async () => {
    const created = iso(START);
    await sql.run(
      `INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES (?, 1, x'00', ?)`,
      [sha, created],
    );
    const sites: number[] = [];
    for (const i of [1, 2, 3, 4, 5])
      sites.push(
        await newId('INSERT INTO sites (name, created_at) VALUES (?, ?)', [`site-${i}`, created]),
      );
    for (let i = 0; i < OUTLETS; i++) {
      const h = simulateFoulingHistory({
        seed: i + 1,
        months: MONTHS,
        startMs: START,
        baselineAreaM2: 1e-3 * (1 + (i % 7) / 10),
        driftPctPerYear: -((i % 11) * 0.8),
        relU: 0.005 + (i % 5) * 0.003,
        dayJitter: 4,
        maintenance: i % 3 === 0 ? [{ month: 40 + (i % 50) }] : [],
        steps: i % 97 === 0 ? [{ month: 110, pct: -8 }] : [],
      });
      const v = await newId(
        `INSERT INTO vessels (site_id, name, spec, shape, created_at, updated_at) VALUES (?, ?, ?, '{}', ?, ?)`,
        [sites[i % 5], `V-${i}`, '{}', created, created],
      );
      const o = await newId(
        `INSERT INTO outlets (vessel_id, key, bore_m, elevation_m, action_threshold, spec) VALUES (?, 'main', 0.05, 0, ?, '{}')`,
        [v, i % 4 === 0 ? 0.85 : null],
      );
      for (const f of h.fits) {
        const at = iso(f.testedAtMs);
        const t = await newId(
          `INSERT INTO drain_tests (vessel_id, outlet_id, log_sha256, log_name, settings, status, tested_at, created_at)
          VALUES (?, ?, ?, 'log.csv', '{}', 'analysed', ?, ?)`,
          [v, o, sha, at, at],
        );
        const result = JSON.stringify({
          effectiveAreaM2: { value: f.effectiveAreaM2, standardUncertainty: f.effectiveAreaU },
          dischargeCoefficient: {
            value: f.dischargeCoefficient,
            standardUncertainty: f.dischargeCoefficientU,
          },
        });
        await sql.run(
          `INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd, cda_u, cd_u,
          status, reviewed_at, created_at) VALUES (?, ?, ?, '{}', '{}', ?, 'bench', ?, ?, ?, ?, 'approved', ?, ?)`,
          [
            t,
            v,
            o,
            result,
            f.effectiveAreaM2,
            f.dischargeCoefficient,
            f.effectiveAreaU,
            f.dischargeCoefficientU,
            at,
            at,
          ],
        );
      }
      for (const e of h.events)
        await sql.run(
          `INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, created_at) VALUES (?, ?, 'cleaned', ?, ?)`,
          [v, o, iso(e.atMs), created],
        );
    }
  });
  return performance.now() - t0;
}

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
