import { THETA, THETA_SIZE, type DrainSetting } from '../drain/parameters.js';
import type { ModelTerms } from './terms.js';
import { fitVariant, type FittedVariant, type VariantInput } from './variant.js';

/**
 * Start values from the data alone: the mean flow between the first and last tenth of the
 * window (volume difference over time difference, through the real shape) divided by the mean
 * jet speed sqrt(2gH) gives Cd·a; the first readings give the initial level.
 */
export function startTheta(
  setting: DrainSetting,
  timeS: Float64Array,
  levelM: Float64Array,
  sensorZeroM: number,
): Float64Array {
  const m = timeS.length;
  const tenth = Math.max(1, Math.floor(m / 10));
  const mean = (arr: Float64Array, from: number, to: number): number => {
    let s = 0;
    for (let i = from; i < to; i++) s += arr[i];
    return s / (to - from);
  };
  const yA = mean(levelM, 0, tenth);
  const tA = mean(timeS, 0, tenth);
  const yB = mean(levelM, m - tenth, m);
  const tB = mean(timeS, m - tenth, m);
  const etaA = yA + sensorZeroM;
  const etaB = yB + sensorZeroM;
  const volumeRate =
    (setting.shape.volumeM3(etaA) - setting.shape.volumeM3(etaB)) / Math.max(tB - tA, 1e-9);
  let flow = volumeRate;
  if (!Number.isFinite(flow) || flow <= 0) {
    // shapes without a volume function, or a barely falling window: use the area at mid-level
    const mid = 0.5 * (etaA + etaB);
    flow = (setting.shape.areaM2(mid) * Math.max(yA - yB, 1e-6)) / Math.max(tB - tA, 1e-9);
  }
  const g2 = 2 * setting.gravity;
  const headA = Math.max(etaA - setting.outletElevationM, 1e-4);
  const headB = Math.max(etaB - setting.outletElevationM, 1e-4);
  const jet = 0.5 * (Math.sqrt(g2 * headA) + Math.sqrt(g2 * headB));
  const theta = new Float64Array(THETA_SIZE);
  theta[THETA.effectiveArea] = Math.max(flow / jet, 1e-12);
  // extrapolated back to t = 0 along the straight line between the two tenths
  const slope = (yB - yA) / Math.max(tB - tA, 1e-9);
  theta[THETA.initialReading] = yA - slope * tA;
  theta[THETA.sensorZero] = sensorZeroM;
  theta[THETA.inflow] = 0;
  theta[THETA.exponent] = 0.5;
  return theta;
}

/** Samples in the quick fit that refines the start; the final fit always uses every sample. */
const QUICK_FIT_SAMPLES = 2000;

/**
 * A fit on every stride-th sample (first and last included, so the span and the ODE's grid are
 * the same), used only as the start of the full fit: the full fit then needs a step or two on all
 * m samples instead of the whole approach. A quick fit that fails leaves the start as it was.
 */
export function refineStartOnSubsample(
  input: VariantInput,
  terms: ModelTerms,
  start: Float64Array,
): Float64Array {
  const m = input.timeS.length;
  const stride = Math.floor(m / QUICK_FIT_SAMPLES);
  if (stride < 4) return start;
  const count = Math.floor((m - 1) / stride) + 1 + ((m - 1) % stride ? 1 : 0);
  const t = new Float64Array(count);
  const y = new Float64Array(count);
  let j = 0;
  for (let i = 0; i < m; i += stride, j++) (t[j] = input.timeS[i]), (y[j] = input.levelM[i]);
  if (j < count) (t[j] = input.timeS[m - 1]), (y[j] = input.levelM[m - 1]);
  let quick: FittedVariant;
  try {
    quick = fitVariant({ setting: input.setting, timeS: t, levelM: y }, terms, start);
  } catch {
    return start;
  }
  if (!quick.solve.converged || !quick.theta.every(Number.isFinite)) return start;
  return quick.theta;
}
