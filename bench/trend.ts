/**
 * Trend benchmark: a fleet of 5 000 outlets × 10 years of monthly fits (invented histories).
 * Times the fleet status of all outlets (status of each + fleet order) and one outlet's full trend.
 * Goals: fleet < 200 ms, one outlet < 20 ms. Run: npx tsx bench/trend.ts
 */
import {
  simulateFoulingHistory,
  outletStatus,
  outletTrend,
  fleetOrder,
  type FoulingHistory,
} from '../server/core/trend/index.js';

const OUTLETS = 5000,
  MONTHS = 120;
const START = Date.UTC(2015, 0, 1);
const NOW = START + MONTHS * (365.25 / 12) * 86_400_000;

const fleet: FoulingHistory[] = [];
for (let i = 0; i < OUTLETS; i++) {
  fleet.push(
    simulateFoulingHistory({
      seed: i + 1,
      months: MONTHS,
      startMs: START,
      baselineAreaM2: 1e-3 * (1 + (i % 7) / 10),
      driftPctPerYear: -((i % 11) * 0.8),
      relU: 0.005 + (i % 5) * 0.003,
      dayJitter: 4,
      maintenance: i % 3 === 0 ? [{ month: 40 + (i % 50) }] : [],
      steps: i % 97 === 0 ? [{ month: 110, pct: -8 }] : [],
      idPrefix: `o${i}`,
    }),
  );
}
const settings = { actionThresholdPct: -10 };

function fleetStatus() {
  return fleetOrder(
    fleet.map((h, i) => ({ outletId: i, ...outletStatus(h.fits, h.events, settings, NOW) })),
  );
}

function time(label: string, runs: number, f: () => unknown): number {
  f(); // warm up
  const ms: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    f();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  const med = ms[Math.floor(runs / 2)];
  console.log(
    `${label}: median ${med.toFixed(2)} ms, min ${ms[0].toFixed(2)} ms, max ${ms[runs - 1].toFixed(2)} ms over ${runs} runs`,
  );
  return med;
}

console.log(`${OUTLETS} outlets × ${MONTHS} monthly fits (${OUTLETS * MONTHS} fits)`);
const fleetMs = time('fleet status (all outlets, ordered)', 7, fleetStatus);
const one = fleet[OUTLETS - 1];
const oneMs = time('one outlet trend (all epochs, bands)', 51, () =>
  outletTrend(one.fits, one.events, settings, NOW),
);
const counts = new Map<string, number>();
for (const s of fleetStatus()) counts.set(s.status, (counts.get(s.status) ?? 0) + 1);
console.log('statuses:', Object.fromEntries(counts));
console.log(
  `goals: fleet < 200 ms ${fleetMs < 200 ? 'met' : 'MISSED'}, one outlet < 20 ms ${oneMs < 20 ? 'met' : 'MISSED'}`,
);
