import { InputError } from '../errors.js';
import { tQuantile } from '../stats/index.js';
import { DAY_MS, YEAR_MS, type TrendLine } from './trendline.js';

export type ForecastStatus = 'forecast' | 'crossed' | 'not-significant' | 'away-from-threshold';

export interface ThresholdForecast {
  status: ForecastStatus;
  /** baseline·(1 + thresholdPct/100). */
  thresholdValue: number;
  /** Where the fitted line meets the threshold (null when no forecast is made). */
  crossingMs: number | null;
  /** 95 % interval on that date; null on a side means unbounded on that side. */
  lowerMs: number | null;
  upperMs: number | null;
  daysFromNow: number | null;
  /** slope / u(slope), signed so that positive points toward the threshold. */
  slopeTowardT: number;
  reason: string;
}

const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/**
 * When the epoch's line reaches baseline·(1 + thresholdPct/100).
 *
 * A forecast is made only when the slope points toward the threshold and differs from zero by a
 * one-sided 5 % t-test; otherwise the output says which of the two failed. The 95 % interval on
 * the date is the inverse-regression (Fieller) set: the times whose 95 % band on the line's value
 * contains the threshold, i.e. the t with (a + b·t − L)² ≤ q²·var(a + b·t). When the slope is
 * significant one-sided but not two-sided at 95 % that set is a half-line: the far side is then
 * reported as unbounded (null), not clipped.
 */
export function forecastThresholdCrossing(
  line: TrendLine,
  baseline: number,
  thresholdPct: number,
  nowMs: number,
): ThresholdForecast {
  if (!Number.isFinite(thresholdPct) || thresholdPct === 0)
    throw new InputError('action threshold must be a non-zero percentage', {
      field: 'actionThresholdPct',
    });
  if (!(baseline > 0)) throw new InputError('baseline must be positive', { field: 'baseline' });
  if (!Number.isFinite(nowMs)) throw new InputError('now is not a time', { field: 'nowMs' });
  const L = baseline * (1 + thresholdPct / 100);
  const f = line.fit;
  const a = f.intercept,
    b = f.slope;
  const dir = Math.sign(thresholdPct);
  const slopeTowardT = (dir * b) / f.uSlope;
  const none = (status: ForecastStatus, reason: string): ThresholdForecast => ({
    status,
    thresholdValue: L,
    crossingMs: null,
    lowerMs: null,
    upperMs: null,
    daysFromNow: null,
    slopeTowardT,
    reason,
  });
  const pctYr = line.slopePctPerYear.toFixed(2);
  if (dir * b <= 0) {
    return none(
      'away-from-threshold',
      `the trend (${pctYr} %/year) points away from the ${thresholdPct} % threshold`,
    );
  }
  const tOne = tQuantile(0.95, f.dof);
  if (slopeTowardT < tOne) {
    return none(
      'not-significant',
      `the trend (${pctYr} ± ${line.slopePctPerYearU.toFixed(2)} %/year) is not distinguishable from no change (t = ${slopeTowardT.toFixed(2)} < ${tOne.toFixed(2)})`,
    );
  }
  const tHat = (L - a) / b;
  const q2 = f.tQuantile95 ** 2;
  // In centred time s = t − meanT the value and slope are uncorrelated: var = u0² + s²·ub².
  const s0 = tHat - f.meanT;
  const d = a + b * f.meanT - L; // line value at meanT minus threshold
  const A = b * b - q2 * f.uSlope ** 2;
  const B = 2 * b * d;
  const C = d * d - q2 * f.uAtMeanT ** 2;
  const disc = B * B - 4 * A * C;
  let lo: number | null = null,
    hi: number | null = null;
  if (A > 0) {
    const sq = Math.sqrt(Math.max(0, disc));
    const qq = -0.5 * (B + (B >= 0 ? sq : -sq));
    const r1 = qq / A,
      r2 = qq !== 0 ? C / qq : -r1;
    lo = Math.min(r1, r2);
    hi = Math.max(r1, r2);
  } else if (disc > 0 && A < 0) {
    const sq = Math.sqrt(disc);
    const qq = -0.5 * (B + (B >= 0 ? sq : -sq));
    const r1 = qq / A,
      r2 = C / qq;
    const rl = Math.min(r1, r2),
      rh = Math.max(r1, r2);
    // The set is (−∞, rl] ∪ [rh, ∞); report the half-line that holds the estimate.
    if (s0 >= rh) lo = rh;
    else hi = rl;
  } // else: the band holds the threshold at every time: both sides unbounded.
  const toMs = (s: number | null) => (s === null ? null : line.originMs + (s + f.meanT) * YEAR_MS);
  const crossingMs = line.originMs + tHat * YEAR_MS;
  const lowerMs = toMs(lo),
    upperMs = toMs(hi);
  const daysFromNow = (crossingMs - nowMs) / DAY_MS;
  const span = `95 % interval ${lowerMs === null ? 'unbounded' : iso(lowerMs)} to ${upperMs === null ? 'unbounded' : iso(upperMs)}`;
  if (crossingMs <= nowMs) {
    return {
      status: 'crossed',
      thresholdValue: L,
      crossingMs,
      lowerMs,
      upperMs,
      daysFromNow,
      slopeTowardT,
      reason: `the trend line reached the ${thresholdPct} % threshold on ${iso(crossingMs)} (${span})`,
    };
  }
  return {
    status: 'forecast',
    thresholdValue: L,
    crossingMs,
    lowerMs,
    upperMs,
    daysFromNow,
    slopeTowardT,
    reason: `at ${pctYr} %/year the ${thresholdPct} % threshold is reached on ${iso(crossingMs)} (${span})`,
  };
}
