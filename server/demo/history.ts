import { simulateFoulingHistory, YEAR_MS } from '../core/trend/index.js';
import { HISTORIES, HISTORY_DRAIN, type DemoHistory, type DemoTest } from './scenario.js';

/** One month's test of a demo history: the log to simulate and what the trend should find. */
export interface HistoryTest {
  history: DemoHistory;
  month: number;
  test: DemoTest;
  trueEffectiveAreaM2: number;
}

export interface HistoryEvent {
  history: DemoHistory;
  kind: 'cleaned' | 'replaced' | 'modified';
  occurredAt: string;
  notes: string;
}

const nominalArea = (h: DemoHistory) => (Math.PI * h.vessel.outlet.boreM ** 2) / 4;

/** The true Cd·a of a history at a time (steps and maintenance included), from the same simulator. */
export function historyTruth(h: DemoHistory) {
  return simulateFoulingHistory({
    seed: h.seed,
    months: h.months,
    startMs: Date.parse(h.startIso),
    baselineAreaM2: 0.62 * nominalArea(h),
    driftPctPerYear: h.driftPctPerYear,
    relU: 0.002, // only its noisy values use this; the logs are made from the truths
    steps: h.steps,
    maintenance: h.maintenance?.map((m) => ({
      month: m.month,
      kind: m.kind,
      restorePct: m.restorePct,
    })),
  });
}

/** Every monthly test and maintenance event of the demo histories, in time order per history. */
export function expandHistories(histories: readonly DemoHistory[] = HISTORIES): {
  tests: HistoryTest[];
  events: HistoryEvent[];
} {
  const tests: HistoryTest[] = [];
  const events: HistoryEvent[] = [];
  for (const h of histories) {
    const sim = historyTruth(h);
    sim.fits.forEach((f, m) => {
      const at = new Date(f.testedAtMs).toISOString().replace('.000Z', 'Z');
      const truth = sim.trueAreaM2[m];
      tests.push({
        history: h,
        month: m,
        trueEffectiveAreaM2: truth,
        test: {
          ...HISTORY_DRAIN,
          log: `history/${h.logPrefix}-${at.slice(0, 10)}.csv`,
          vessel: h.vessel.name,
          layout: 'history-elapsed-m',
          // rounded so the manifest states the Cd each log was made with exactly
          cd: Math.round((truth / nominalArea(h)) * 1e6) / 1e6,
          startIso: at,
          settings: {},
          operator: 'R. Calloway (fictional)',
          loggerId: 'KF-LG-11',
          notes: `Monthly test ${m + 1} of ${h.months} (${h.story}).`,
          seed: h.seed * 1000 + m,
        },
      });
    });
    sim.events.forEach((e, i) => {
      events.push({
        history: h,
        kind: e.kind,
        occurredAt: new Date(e.atMs).toISOString().slice(0, 10),
        notes: h.maintenance![i].notes,
      });
    });
  }
  return { tests, events };
}

/**
 * When the true Cd·a of a history's last epoch reaches `level` (m²), or null if it does not fall
 * (steps excluded: the demo's fouling history has none).
 */
export function trueCrossingMs(h: DemoHistory, level: number): number | null {
  const sim = historyTruth(h);
  const ep = sim.epochs[sim.epochs.length - 1];
  if (h.driftPctPerYear === 0) return null;
  return ep.startMs + (YEAR_MS * (level / ep.startAreaM2 - 1)) / (h.driftPctPerYear / 100);
}
