import { solveLeastSquares, type SolveWorkspace } from '../lsq/index.js';
import type { SolveResult } from '../lsq/types.js';
import { solutionFor, type DrainSolution } from '../drain/predict.js';
import type { DrainSetting } from '../drain/parameters.js';
import { drainProblem, expandTheta } from './problem.js';
import { boundsFor, freeIndices, type ModelTerms } from './terms.js';

/** One model variant fitted: which terms, the solver's record, and θ at the optimum. */
export interface FittedVariant {
  terms: ModelTerms;
  solution: DrainSolution;
  free: Int32Array;
  theta: Float64Array;
  solve: SolveResult;
  /** Number of free parameters. */
  k: number;
}

export interface VariantInput {
  setting: DrainSetting;
  timeS: Float64Array;
  levelM: Float64Array;
}

/** For refits: `work` lends the solver's m-sized buffers across them; `sumSquaresOnly` skips the covariance. */
export interface RefitOptions {
  work?: SolveWorkspace;
  sumSquaresOnly?: boolean;
}

export function fitVariant(
  input: VariantInput,
  terms: ModelTerms,
  start: Float64Array,
  fixed?: { index: number; value: number },
  refit: RefitOptions = {},
): FittedVariant {
  let free = freeIndices(terms);
  const base = Float64Array.from(start);
  if (fixed) {
    base[fixed.index] = fixed.value;
    free = free.filter((j) => j !== fixed.index);
  }
  const solution = solutionFor(input.setting, terms.inflow);
  const { lower, upper } = boundsFor(free);
  const problem = drainProblem({
    setting: input.setting,
    solution,
    timeS: input.timeS,
    levelM: input.levelM,
    theta: base,
    free,
    lower,
    upper,
  });
  const p0 = Float64Array.from(free, (j) => base[j]);
  const solve = solveLeastSquares(
    problem,
    p0,
    { maxIterations: 200, ftol: 1e-12, xtol: 1e-12, skipCovariance: refit.sumSquaresOnly },
    refit.work,
  );
  return { terms, solution, free, theta: expandTheta(base, free, solve.p), solve, k: free.length };
}
