import { THETA } from '../drain/parameters.js';
import type { UncertaintyModel } from './uncertainty.js';
import { createSolveWorkspace, type SolveWorkspace } from '../lsq/index.js';
import { fitVariant, type FittedVariant, type VariantInput } from './variant.js';

/**
 * Profile-likelihood 95 % interval for Cd·a: the set of Cd·a for which the best fit of the
 * other parameters raises the sum of squares by no more than t²·s²·(inflation), the same
 * scale as the Wald interval. Solved on the signed root
 *   r(c) = sign(c − ĉ)·sqrt((SSR(c) − SSR_min)/(s²·inflation)),
 * which is close to linear in c, by secant steps from the Wald end points.
 *
 * Each refit starts where the covariance at the optimum says the other parameters go when Cd·a
 * is held at c (their conditional mean, θ_j + Σ_jc/Σ_cc·(c − ĉ)), so it needs a step or two; the
 * refits share one set of work buffers and compute no covariance.
 */
export interface ProfileInterval {
  lower: number;
  upper: number;
  /** Refits used. */
  refits: number;
  /** False when a side could not be bracketed (then that side is the Wald value). */
  found: boolean;
}

export function profileIntervalEffectiveArea(
  input: VariantInput,
  best: FittedVariant,
  unc: UncertaintyModel,
  work: SolveWorkspace = createSolveWorkspace(),
): ProfileInterval {
  const col = Array.from(best.free).indexOf(THETA.effectiveArea);
  const centre = best.theta[THETA.effectiveArea];
  const u = unc.standardUncertainties[col];
  const t = unc.coverageFactor;
  const scale = unc.residualVariance * unc.varianceInflation;
  let refits = 0;
  let found = true;

  const k = best.k;
  const start = new Float64Array(best.theta.length);
  const signedRoot = (c: number): number => {
    refits++;
    start.set(best.theta);
    const cc = unc.covariance[col * k + col];
    for (let j = 0; j < k; j++) {
      if (j !== col && cc > 0)
        start[best.free[j]] += (unc.covariance[j * k + col] / cc) * (c - centre);
    }
    const v = fitVariant(
      input,
      best.terms,
      start,
      { index: THETA.effectiveArea, value: c },
      { work, sumSquaresOnly: true },
    );
    const rise = Math.max(v.solve.sumSquares - best.solve.sumSquares, 0);
    return Math.sign(c - centre) * Math.sqrt(rise / scale);
  };

  const side = (direction: 1 | -1): number => {
    const target = direction * t;
    let c0 = centre;
    let r0 = 0;
    let c1 = Math.max(centre + direction * t * u, centre * 1e-6);
    let r1 = signedRoot(c1);
    for (let iter = 0; iter < 8; iter++) {
      if (!Number.isFinite(r1) || r1 === r0) break;
      if (Math.abs(r1 - target) < 1e-4 * t) return c1;
      const c2 = Math.max(c1 + ((target - r1) * (c1 - c0)) / (r1 - r0), centre * 1e-6);
      c0 = c1;
      r0 = r1;
      c1 = c2;
      r1 = signedRoot(c1);
    }
    if (Number.isFinite(r1) && Math.abs(r1 - target) < 1e-2 * t) return c1;
    found = false;
    return centre + direction * t * u;
  };

  if (!(u > 0) || !Number.isFinite(u))
    return { lower: centre, upper: centre, refits: 0, found: false };
  const lower = side(-1);
  const upper = side(1);
  return { lower, upper, refits, found };
}
