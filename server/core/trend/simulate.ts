import { seededRandom } from '../random/prng.js';
import { InputError } from '../errors.js';
import type { ApprovedFit, MaintenanceEvent, MaintenanceKind } from './types.js';
import { YEAR_MS, DAY_MS } from './trendline.js';

/**
 * Invented outlet histories with a known truth, for tests and demo data only. Monthly tests; the
 * true Cd·a falls (or rises) linearly at driftPctPerYear of the epoch's starting value; a step
 * moves it suddenly; a cleaning puts it back. Each test's noise is drawn from its own stated
 * uncertainty, so a correct trend analysis should find χ²/dof ≈ 1.
 */
export interface FoulingHistoryOptions {
  seed: number;
  months: number;
  startMs: number;
  baselineAreaM2: number;
  /** Linear drift, % of the epoch's starting Cd·a per year (negative: fouling). */
  driftPctPerYear: number;
  /** Relative standard uncertainty of each Cd·a test (e.g. 0.01). */
  relU: number;
  /** Nominal bore area for Cd = Cd·a / a (default: as if Cd were 0.62 at baseline). */
  nominalAreaM2?: number;
  /** Relative standard uncertainty of the bore diameter (default 0.002): u_r(Cd)² = u_r(Cd·a)² + (2·u_r(d))². */
  boreRelU?: number;
  /** Sudden changes: from test `month` on, Cd·a moves by pct % of baseline. */
  steps?: { month: number; pct: number }[];
  /** Maintenance half a month before test `month`; the true Cd·a returns to baseline·(1 + restorePct/100). */
  maintenance?: { month: number; kind?: MaintenanceKind; restorePct?: number }[];
  /** Tests land at a uniformly random offset of ± this many days from the monthly slot. */
  dayJitter?: number;
  idPrefix?: string;
}

export interface FoulingHistory {
  fits: ApprovedFit[];
  events: MaintenanceEvent[];
  /** The true Cd·a at each test, aligned with fits. */
  trueAreaM2: Float64Array;
  /** Per epoch: when its drift started and the true Cd·a then (steps not included). */
  epochs: { startMs: number; startAreaM2: number }[];
}

/** Uniform draws on [0, 1) from the one seeded generator (random/prng.ts). */
export function seededUniform(seed: number): () => number {
  return seededRandom(seed).uniform;
}

/** Standard normal draws from the one seeded generator (random/prng.ts). */
export function seededNormal(seed: number): () => number {
  return seededRandom(seed, 'complement').normal;
}

export function simulateFoulingHistory(o: FoulingHistoryOptions): FoulingHistory {
  if (!Number.isInteger(o.months) || o.months < 1)
    throw new InputError('months must be a whole number ≥ 1', { field: 'months' });
  if (!(o.baselineAreaM2 > 0))
    throw new InputError('baseline area must be positive', { field: 'baselineAreaM2' });
  if (!(o.relU > 0))
    throw new InputError('relative uncertainty must be positive', { field: 'relU' });
  const normal = seededNormal(o.seed);
  const uniform = seededUniform(o.seed ^ 0x5bd1e995);
  const aNom = o.nominalAreaM2 ?? o.baselineAreaM2 / 0.62;
  const boreRelU = o.boreRelU ?? 0.002;
  const cdRelU = Math.sqrt(o.relU ** 2 + (2 * boreRelU) ** 2);
  const monthMs = YEAR_MS / 12;
  const prefix = o.idPrefix ?? 'sim';
  const fits: ApprovedFit[] = [];
  const events: MaintenanceEvent[] = [];
  const trueArea = new Float64Array(o.months);
  const epochs = [{ startMs: o.startMs, startAreaM2: o.baselineAreaM2 }];
  const maint = new Map((o.maintenance ?? []).map((m) => [m.month, m]));
  let stepPct = 0;
  for (let m = 0; m < o.months; m++) {
    const slot = o.startMs + m * monthMs;
    const mt = maint.get(m);
    if (mt && m > 0) {
      const at = slot - monthMs / 2;
      events.push({ atMs: at, kind: mt.kind ?? 'cleaned' });
      epochs.push({
        startMs: at,
        startAreaM2: o.baselineAreaM2 * (1 + (mt.restorePct ?? 0) / 100),
      });
      stepPct = 0; // maintenance clears a blockage too
    }
    for (const s of o.steps ?? []) if (s.month === m) stepPct += s.pct;
    const jitter = o.dayJitter ? (2 * uniform() - 1) * o.dayJitter * DAY_MS : 0;
    const at = Math.round(slot + jitter);
    const ep = epochs[epochs.length - 1];
    const truth =
      ep.startAreaM2 * (1 + (o.driftPctPerYear / 100) * ((at - ep.startMs) / YEAR_MS)) +
      (o.baselineAreaM2 * stepPct) / 100;
    const u = o.relU * truth;
    const y = truth + u * normal();
    trueArea[m] = truth;
    fits.push({
      fitId: `${prefix}-${String(m).padStart(4, '0')}`,
      testedAtMs: at,
      effectiveAreaM2: y,
      effectiveAreaU: u,
      dischargeCoefficient: y / aNom,
      dischargeCoefficientU: (cdRelU * truth) / aNom,
    });
  }
  return { fits, events, trueAreaM2: trueArea, epochs };
}
