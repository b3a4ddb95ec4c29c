import type { LeastSquaresProblem } from '../lsq/types.js';
import { predictReadings, type DrainSolution } from '../drain/predict.js';
import { THETA_SIZE, type DrainSetting } from '../drain/parameters.js';

/**
 * The drain fit as a least-squares problem: residual r_i = model reading − observed reading,
 * over the free entries of θ (the others held at their values in `theta`).
 */
export interface DrainProblemInput {
  setting: DrainSetting;
  solution: DrainSolution;
  /** Seconds from the window's start, ascending (only the samples that take part). */
  timeS: Float64Array;
  levelM: Float64Array;
  /** Full θ with the fixed entries at their values; free entries are overwritten per evaluation. */
  theta: Float64Array;
  /** Indices into θ of the free parameters. */
  free: Int32Array;
  lower?: Float64Array;
  upper?: Float64Array;
}

export function drainProblem(input: DrainProblemInput): LeastSquaresProblem {
  const { setting, solution, timeS, levelM, free } = input;
  const theta = Float64Array.from(input.theta);
  const m = timeS.length;
  const n = free.length;
  return {
    m,
    n,
    lower: input.lower,
    upper: input.upper,
    evaluate(p, r, J) {
      for (let j = 0; j < n; j++) theta[free[j]] = p[j];
      // the model's readings go straight into r, which then becomes the residual in place
      if (!predictReadings(setting, solution, theta, timeS, r, J, free)) return false;
      for (let i = 0; i < m; i++) r[i] -= levelM[i];
      return true;
    },
  };
}

/** θ with the free entries replaced by p. */
export function expandTheta(base: Float64Array, free: Int32Array, p: Float64Array): Float64Array {
  const theta = Float64Array.from(base);
  for (let j = 0; j < free.length; j++) theta[free[j]] = p[j];
  return theta;
}

export { THETA_SIZE };
