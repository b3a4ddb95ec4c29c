import type { ApprovedFit } from './types.js';
import type { WeightedLine } from './line.js';
import { YEAR_MS } from './trendline.js';

/**
 * Sudden change (a partial blockage, a lodged object, a broken insert) shows as a jump off the
 * epoch's line. Each test is compared with the line fitted to the tests before it (one-step-ahead
 * prediction), standardised by sqrt(u_i² + var(prediction)) and by the Birge factor
 * max(1, sqrt(χ²/dof)) of those earlier tests when they scatter more than their stated u's. The
 * factor comes from the earlier tests only, so a step does not hide itself by inflating it; with
 * fewer than MIN_BIRGE_DOF earlier degrees of freedom the whole epoch line's factor stands in.
 * With honest u's these z are independent N(0, 1) under no change, whatever the drift.
 *
 * Two detectors on those z:
 * - two-sided tabular CUSUM, S⁺ = max(0, S⁺ + z − k), S⁻ = max(0, S⁻ − z − k), alarm when one
 *   exceeds h. k = 1 aims it at jumps of about 2 standard uncertainties (k is half the jump it is
 *   tuned for, common practice); h = 5 keeps false alarms rare over years of monthly tests (the
 *   rate is measured in test/core/trend/step.test.ts).
 * - the latest test alone against its prediction: |z| > 3, so a blockage found by this month's
 *   test is flagged at once, before a CUSUM could accumulate.
 */
export const CUSUM_K = 1;
export const CUSUM_H = 5;
export const LATEST_Z_LIMIT = 3;
/** Tests needed before the first prediction (a line needs 3 for a degree of freedom). */
export const MIN_PRIOR = 3;
/** Below this many earlier degrees of freedom their own Birge factor is too noisy to use. */
export const MIN_BIRGE_DOF = 5;

export interface StepCheck {
  flagged: boolean;
  by: 'cusum' | 'latest-test' | 'both' | null;
  /** First test after the change: for CUSUM the test after the sum last stood at zero. */
  fitId: string | null;
  /** The test at which the alarm was raised. */
  alarmFitId: string | null;
  direction: 'drop' | 'rise' | null;
  /** z of the latest test against the prediction from the earlier tests (null if too few). */
  latestZ: number | null;
  /** Standardised one-step-ahead residuals, aligned with the fits (NaN for the first MIN_PRIOR). */
  z: Float64Array;
  k: number;
  h: number;
  zLimit: number;
  reason: string;
}

/** `epochFits` in time order (an Epoch's fits); `line` the epoch's Cd·a line (its Birge factor stands in early on). */
export function detectStep(
  epochFits: readonly ApprovedFit[],
  line: WeightedLine | null,
): StepCheck {
  const n = epochFits.length;
  const z = new Float64Array(n).fill(NaN);
  const lineScale = line ? line.scale : 1;
  const base = { k: CUSUM_K, h: CUSUM_H, zLimit: LATEST_Z_LIMIT, z };
  if (n <= MIN_PRIOR) {
    return {
      ...base,
      flagged: false,
      by: null,
      fitId: null,
      alarmFitId: null,
      direction: null,
      latestZ: null,
      reason: `fewer than ${MIN_PRIOR + 1} tests in this epoch: no prediction to compare with yet`,
    };
  }
  // Running weighted sums about the first test, so nothing large is subtracted.
  const t0 = epochFits[0].testedAtMs,
    y0 = epochFits[0].effectiveAreaM2;
  let S = 0,
    St = 0,
    Stt = 0,
    Sy = 0,
    Sty = 0,
    Syy = 0;
  let up = 0,
    down = 0,
    upStart = 0,
    downStart = 0;
  let alarmAt = -1,
    changeAt = -1,
    dir: 'drop' | 'rise' | null = null;
  for (let i = 0; i < n; i++) {
    const f = epochFits[i];
    const t = (f.testedAtMs - t0) / YEAR_MS;
    const y = f.effectiveAreaM2 - y0;
    const w = 1 / (f.effectiveAreaU * f.effectiveAreaU);
    if (i >= MIN_PRIOR) {
      const tm = St / S,
        ym = Sy / S;
      const ctt = Stt - St * tm;
      const b = ctt > 0 ? (Sty - St * ym) / ctt : 0;
      const dt = t - tm;
      const varPred = 1 / S + (ctt > 0 ? (dt * dt) / ctt : 0);
      const dofPrior = i - 2;
      const chi2Prior = Math.max(0, Syy - Sy * ym - b * (Sty - St * ym));
      const scale =
        dofPrior >= MIN_BIRGE_DOF ? Math.max(1, Math.sqrt(chi2Prior / dofPrior)) : lineScale;
      const zi = (y - ym - b * dt) / (scale * Math.sqrt(f.effectiveAreaU ** 2 + varPred));
      z[i] = zi;
      if (alarmAt < 0) {
        if (up === 0) upStart = i;
        if (down === 0) downStart = i;
        up = Math.max(0, up + zi - CUSUM_K);
        down = Math.max(0, down - zi - CUSUM_K);
        if (up > CUSUM_H || down > CUSUM_H) {
          alarmAt = i;
          dir = down > CUSUM_H ? 'drop' : 'rise';
          changeAt = dir === 'drop' ? downStart : upStart;
        }
      }
    }
    S += w;
    St += w * t;
    Stt += w * t * t;
    Sy += w * y;
    Sty += w * t * y;
    Syy += w * y * y;
  }
  const latestZ = z[n - 1];
  const latestFlag = Math.abs(latestZ) > LATEST_Z_LIMIT;
  const cusumFlag = alarmAt >= 0;
  const last = epochFits[n - 1];
  const date = (f: ApprovedFit) => new Date(f.testedAtMs).toISOString().slice(0, 10);
  if (!cusumFlag && !latestFlag) {
    return {
      ...base,
      flagged: false,
      by: null,
      fitId: null,
      alarmFitId: null,
      direction: null,
      latestZ,
      reason: `no test departs from the epoch's line (latest z = ${latestZ.toFixed(2)}, CUSUM below ${CUSUM_H})`,
    };
  }
  const latestDir: 'drop' | 'rise' = latestZ < 0 ? 'drop' : 'rise';
  if (cusumFlag) {
    const from = epochFits[changeAt],
      at = epochFits[alarmAt];
    const by = latestFlag ? 'both' : 'cusum';
    return {
      ...base,
      flagged: true,
      by,
      fitId: from.fitId,
      alarmFitId: at.fitId,
      direction: dir,
      latestZ,
      reason:
        `sudden ${dir} from the test of ${date(from)}: the cumulative departure from the line passed ${CUSUM_H} at ${date(at)}` +
        (latestFlag
          ? `; the latest test is ${Math.abs(latestZ).toFixed(1)} standard uncertainties off its prediction`
          : ''),
    };
  }
  return {
    ...base,
    flagged: true,
    by: 'latest-test',
    fitId: last.fitId,
    alarmFitId: last.fitId,
    direction: latestDir,
    latestZ,
    reason: `the latest test (${date(last)}) is ${Math.abs(latestZ).toFixed(1)} standard uncertainties ${latestDir === 'drop' ? 'below' : 'above'} the epoch's prediction`,
  };
}
