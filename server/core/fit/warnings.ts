import { THETA } from '../drain/parameters.js';
import { USUAL_CD_BAND } from './coefficient.js';
import type { ModelComparison } from './compare.js';
import type { DrainFitInput, ParameterEstimate } from './fit-drain.js';
import type { HeadBand } from './head-bands.js';
import type { UncertaintyModel } from './uncertainty.js';
import type { FittedVariant } from './variant.js';

export interface FitWarning {
  code: string;
  message: string;
}

/** Thresholds below are common practice for judging a drain fit, not from a published source. */
const MIN_SAMPLES = 30;
const MIN_HEAD_FRACTION_DRAINED = 0.25;
const EXPONENT_TOLERANCE = 0.1;
const CORRELATION_LIMIT = 0.99;

interface WarningContext {
  input: DrainFitInput;
  best: FittedVariant;
  unc: UncertaintyModel;
  dischargeCoefficient: number;
  comparison: ModelComparison | null;
  bands: HeadBand[];
  parameters: ParameterEstimate[];
}

const fmt = (x: number, d = 3) => x.toFixed(d);

export function fitWarnings(ctx: WarningContext): FitWarning[] {
  const w: FitWarning[] = [];
  const { input, best, unc } = ctx;
  const { solve } = best;
  const m = input.timeS.length;

  if (!solve.converged) {
    w.push({
      code: 'not-converged',
      message: `The solver stopped without converging (${solve.stopReason} after ${solve.iterations} iterations): do not use these numbers.`,
    });
  }
  if (solve.rank < best.k) {
    w.push({
      code: 'rank-deficient',
      message: `The data cannot tell the parameters apart (Jacobian rank ${solve.rank} of ${best.k}): drop an optional term or use a longer window.`,
    });
  }
  const type = input.outlet.type ?? 'other';
  const band = USUAL_CD_BAND[type] ?? USUAL_CD_BAND.other;
  const cd = ctx.dischargeCoefficient;
  if (cd < band[0] || cd > band[1]) {
    w.push({
      code: 'cd-outside-usual-band',
      message: `Cd = ${fmt(cd)} is outside the usual ${band[0]}–${band[1]} for a ${type} outlet: check the bore, the vessel geometry, the sensor zero and the data.`,
    });
  }
  if (m < MIN_SAMPLES) {
    w.push({
      code: 'short-window',
      message: `Only ${m} samples in the fitted window; at least ${MIN_SAMPLES} are advisable.`,
    });
  }
  const zs = best.theta[THETA.sensorZero];
  const head0 = input.levelM[0] + zs - input.setting.outletElevationM;
  const head1 = input.levelM[m - 1] + zs - input.setting.outletElevationM;
  if (head0 > 0 && (head0 - head1) / head0 < MIN_HEAD_FRACTION_DRAINED) {
    w.push({
      code: 'little-head-drained',
      message: `Only ${fmt((100 * (head0 - head1)) / head0, 0)} % of the head was drained in the window (${fmt(head0, 3)} m to ${fmt(head1, 3)} m): the curvature that separates the parameters is weak.`,
    });
  }
  if (best.terms.exponent) {
    const n = best.theta[THETA.exponent];
    if (Math.abs(n - 0.5) > EXPONENT_TOLERANCE) {
      w.push({
        code: 'exponent-far-from-half',
        message: `Fitted head exponent n = ${fmt(n)}, far from 0.5 for an orifice: the outlet may be laminar, weir-like or partly blocked.`,
      });
    }
  }
  const k = best.k;
  const names = ctx.parameters.filter((p) => p.free).map((p) => p.name);
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const r = unc.correlations[i * k + j];
      if (Math.abs(r) > CORRELATION_LIMIT) {
        w.push({
          code: 'high-correlation',
          message: `${names[i]} and ${names[j]} are correlated at ${fmt(r)}: their separate values are poorly determined.`,
        });
      }
    }
  }
  for (const p of ctx.parameters) {
    if (p.atBound)
      w.push({ code: 'at-bound', message: `${p.name} ended at its bound (${p.value}).` });
  }
  if (unc.lag1Autocorrelation > 0.5) {
    w.push({
      code: 'correlated-residuals',
      message: `Residuals are serially correlated (lag-1 ${fmt(unc.lag1Autocorrelation, 2)}); uncertainties were widened by ×${fmt(Math.sqrt(unc.varianceInflation), 2)} (AR(1) effective sample size).`,
    });
  }
  for (const row of ctx.comparison?.rows ?? []) {
    if (row.change === 'with' && row.fTest && row.fTest.pValue < 0.001 && row.deltaAic < -10) {
      w.push({
        code: 'term-suggested',
        message: `Adding the ${row.term} term improves the fit markedly (F-test p = ${row.fTest.pValue.toExponential(1)}, ΔAIC = ${fmt(row.deltaAic, 1)}): consider fitting it.`,
      });
    }
    if (row.change === 'without' && row.fTest && row.fTest.pValue > 0.05) {
      w.push({
        code: 'term-not-supported',
        message: `The ${row.term} term is not supported by the data (F-test p = ${fmt(row.fTest.pValue, 2)}); the simpler model is as good.`,
      });
    }
  }
  if (ctx.bands.length >= 2) {
    const values = ctx.bands.map((b) => b.effectiveAreaM2);
    const spread = (Math.max(...values) - Math.min(...values)) / best.theta[THETA.effectiveArea];
    if (spread > 0.05) {
      w.push({
        code: 'cd-varies-with-head',
        message: `Cd·a varies by ${fmt(100 * spread, 1)} % across head bands: look at the low-head end (vortex, Reynolds effects) or the geometry.`,
      });
    }
  }
  return w;
}
