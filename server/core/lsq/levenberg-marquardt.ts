/**
 * Hand-written: no maintained JS solver has bounds, a convergence reason and a covariance (ml-levenberg-marquardt: STACK-NOTES.md).
 *
 * Trust-region Levenberg–Marquardt after MINPACK's lmder (Moré 1978), with box bounds.
 *
 * Each iteration factors the Jacobian by Householder QR with column pivoting, finds the
 * LM parameter for the current trust radius Δ on R (lmpar), and judges the step by the
 * ratio of actual to predicted reduction. D (the scaling) grows with the Jacobian's column
 * norms, which makes the method invariant to the units of the parameters.
 *
 * Bounds (MINPACK has none): trial points are projected onto the box, and a parameter sitting
 * on a bound whose step points out of the box is frozen for the iteration, so the step is
 * solved in the remaining parameters; predicted reduction is computed for the step actually
 * taken. A trial point the model refuses (evaluate → false) or whose residuals are not finite
 * is a rejected step: the radius shrinks, as for any step that made things worse.
 */
import { InputError } from '../errors.js';
import { covarianceFromR } from './covariance.js';
import { lmParameter } from './lmpar.js';
import { euclideanNorm } from './norm.js';
import { columnSumsOfSquaresAndGradient, gatherColumns, sumOfSquares } from './passes.js';
import { applyQt, extractR, householderQr } from './qr.js';
import type { LeastSquaresProblem, SolveOptions, SolveResult, StopReason } from './types.js';

const EPS = 2.220446049250313e-16;

/** Defaults: tight enough for NIST StRD's certified digits, still ending in a few dozen steps. */
export const DEFAULT_SOLVE_OPTIONS: Required<SolveOptions> = {
  maxIterations: 1000,
  maxEvaluations: 4000,
  ftol: 1e-15,
  xtol: 1e-12,
  gtol: 0,
  stepBound: 100,
  skipCovariance: false,
};

const CONVERGED: ReadonlySet<StopReason> = new Set<StopReason>([
  'relative-reduction',
  'relative-step',
  'gradient-orthogonal',
  'zero-residual',
]);

function finite(v: Float64Array): boolean {
  for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i])) return false;
  return true;
}

function validate(
  problem: LeastSquaresProblem,
  p0: Float64Array,
): { lower: Float64Array; upper: Float64Array } {
  const { m, n } = problem;
  if (!Number.isInteger(n) || n < 1)
    throw new InputError('the problem needs at least one parameter', { field: 'n' });
  if (!Number.isInteger(m) || m < n)
    throw new InputError(`${m} residuals cannot determine ${n} parameters`, { field: 'm' });
  if (p0.length !== n)
    throw new InputError(`start has ${p0.length} values for ${n} parameters`, { field: 'p0' });
  const lower = problem.lower ?? new Float64Array(n).fill(-Infinity);
  const upper = problem.upper ?? new Float64Array(n).fill(Infinity);
  if (lower.length !== n || upper.length !== n)
    throw new InputError('bounds must have one value per parameter', { field: 'bounds' });
  for (let j = 0; j < n; j++) {
    if (!Number.isFinite(p0[j]))
      throw new InputError(`start value ${j} is not a finite number`, { field: `p0[${j}]` });
    if (Number.isNaN(lower[j]) || Number.isNaN(upper[j]) || lower[j] > upper[j]) {
      throw new InputError(`bounds of parameter ${j} are empty or not numbers`, {
        field: `bounds[${j}]`,
      });
    }
  }
  return { lower, upper };
}

/**
 * Work arrays a caller may lend to a series of solves of the same size (refits): the m and m×n
 * buffers are then allocated once instead of per solve. Results never alias them.
 */
export interface SolveWorkspace {
  m: Float64Array[];
  mn: Float64Array[];
}

export function createSolveWorkspace(): SolveWorkspace {
  return { m: [], mn: [] };
}

function borrow(pool: Float64Array[], k: number, size: number): Float64Array {
  if (!pool[k] || pool[k].length < size) pool[k] = new Float64Array(size);
  return pool[k].length === size ? pool[k] : pool[k].subarray(0, size);
}

/** ‖r‖ when every entry is finite, else NaN; the plain sum of squares serves unless it left the safe range. */
function residualNorm(r: Float64Array): number {
  const s = sumOfSquares(r);
  if (s > 1e-280 && s < 1e280) return Math.sqrt(s);
  if (s === 0) return 0;
  return finite(r) ? euclideanNorm(r) : NaN;
}

export function solveLeastSquares(
  problem: LeastSquaresProblem,
  p0: Float64Array,
  options: SolveOptions = {},
  work?: SolveWorkspace,
): SolveResult {
  const opt = { ...DEFAULT_SOLVE_OPTIONS, ...stripUndefined(options) };
  const { lower, upper } = validate(problem, p0);
  const { m, n } = problem;

  // Everything the iteration touches is allocated once here (or lent by the caller).
  const ws = work ?? createSolveWorkspace();
  const x = new Float64Array(n);
  for (let j = 0; j < n; j++) x[j] = Math.min(upper[j], Math.max(lower[j], p0[j]));
  const fvec = borrow(ws.m, 0, m);
  const ftrial = borrow(ws.m, 1, m);
  const scratch = borrow(ws.m, 2, m);
  const J = borrow(ws.mn, 0, m * n);
  const a = borrow(ws.mn, 1, m * n);
  const diag = new Float64Array(n);
  const colNorm = new Float64Array(n);
  const grad = new Float64Array(n);
  const free = new Int32Array(n);
  const isFree = new Uint8Array(n);
  const qtf = new Float64Array(n);
  const R = new Float64Array(n * n);
  const diagF = new Float64Array(n);
  const stepF = new Float64Array(n);
  const step = new Float64Array(n);
  const trial = new Float64Array(n);
  const w3 = new Float64Array(n);
  const qrw = {
    ipvt: new Int32Array(n),
    rdiag: new Float64Array(n),
    acnorm: new Float64Array(n),
    wa: new Float64Array(n),
  };
  const lmw = {
    wa1: new Float64Array(n),
    wa2: new Float64Array(n),
    sdiag: new Float64Array(n),
    wa4: new Float64Array(n),
  };

  let evaluations = 0;
  let jacobianEvaluations = 0;
  /** ‖r(p)‖ into r, or NaN when p is refused or r is not finite. */
  const residualsAt = (p: Float64Array, r: Float64Array): number => {
    evaluations++;
    return problem.evaluate(p, r, null) === false ? NaN : residualNorm(r);
  };
  // Residuals and Jacobian at p into fvec and J; J's finiteness is judged by the column sums of the
  // next pass (a NaN or ±∞ entry makes its column's sum of squares non-finite).
  let jacobianNorm = NaN;
  const jacobianAt = (p: Float64Array): boolean => {
    evaluations++;
    jacobianEvaluations++;
    if (problem.evaluate(p, fvec, J) === false) return false;
    jacobianNorm = residualNorm(fvec);
    return !Number.isNaN(jacobianNorm);
  };

  let iterations = 0;
  let stopReason: StopReason | null = null;
  let jacobianCurrent = false;

  // The start is evaluated with its Jacobian at once: the first iteration needs both.
  let startOk = jacobianAt(x);
  const startJacobianRefused = !startOk;
  if (startJacobianRefused && Number.isNaN(residualsAt(x, fvec)))
    return failedStart(problem, x, fvec, evaluations);
  let fnorm = startOk ? jacobianNorm : residualNorm(fvec);
  let par = 0;
  let delta = 0;
  let xnorm = 0;
  let nf = 0;
  let gnorm = 0;
  let lastTrialFailed = false;

  // Factor the Jacobian restricted to the free parameters; returns the scaled gradient norm.
  const factorFree = (): void => {
    gatherColumns(J, m, n, free, nf, a);
    householderQr(a, m, nf, true, qrw);
    applyQt(a, m, nf, fvec, scratch, qtf);
    extractR(a, m, nf, qrw.rdiag, R);
    gnorm = 0;
    for (let j = 0; j < nf; j++) {
      const cn = colNorm[free[qrw.ipvt[j]]];
      if (cn === 0) continue;
      let sum = 0;
      for (let i = 0; i <= j; i++) sum += R[j * nf + i] * (qtf[i] / fnorm);
      gnorm = Math.max(gnorm, Math.abs(sum / cn));
    }
    for (let k = 0; k < nf; k++) diagF[k] = diag[free[k]];
  };

  outer: for (;;) {
    if (iterations >= opt.maxIterations) {
      stopReason = 'max-iterations';
      break;
    }
    if (startOk) startOk = false;
    else if (startJacobianRefused || !jacobianAt(x)) {
      stopReason = 'not-finite';
      break;
    }
    jacobianCurrent = true;
    iterations++;
    if (fnorm === 0) {
      stopReason = 'zero-residual';
      break;
    }

    // Column norms and gradient Jᵀr in one pass over the rows.
    columnSumsOfSquaresAndGradient(J, fvec, m, n, colNorm, grad);
    let jacobianFinite = true;
    for (let j = 0; j < n; j++) {
      if (!Number.isFinite(colNorm[j]) || !Number.isFinite(grad[j])) jacobianFinite = false;
      colNorm[j] = Math.sqrt(colNorm[j]);
    }
    if (!jacobianFinite && !finite(J)) {
      stopReason = 'not-finite';
      jacobianCurrent = false;
      break;
    }

    // Active set: a parameter on a bound whose descent direction (−gradient) leaves the box.
    nf = 0;
    for (let j = 0; j < n; j++) {
      const pinned =
        lower[j] === upper[j] ||
        (x[j] <= lower[j] && grad[j] > 0) ||
        (x[j] >= upper[j] && grad[j] < 0);
      isFree[j] = pinned ? 0 : 1;
      if (!pinned) free[nf++] = j;
    }

    if (iterations === 1) {
      for (let j = 0; j < n; j++) diag[j] = colNorm[j] === 0 ? 1 : colNorm[j];
      xnorm = scaledNorm(diag, x, n);
      delta = opt.stepBound * xnorm;
      if (delta === 0) delta = opt.stepBound;
    }
    if (nf === 0) {
      stopReason = 'gradient-orthogonal';
      break;
    }
    factorFree();
    if (gnorm <= opt.gtol) {
      stopReason = 'gradient-orthogonal';
      break;
    }
    for (let j = 0; j < n; j++) diag[j] = Math.max(diag[j], colNorm[j]);
    for (let k = 0; k < nf; k++) diagF[k] = diag[free[k]];

    for (;;) {
      par = lmParameter(nf, R, qrw.ipvt, diagF, qtf, delta, par, stepF, lmw);

      // A parameter on its bound whose step leaves the box joins the frozen set; re-solve.
      let refreeze = false;
      for (let k = 0; k < nf; k++) {
        const j = free[k];
        const s = -stepF[k];
        if ((x[j] <= lower[j] && s < 0) || (x[j] >= upper[j] && s > 0)) {
          isFree[j] = 0;
          refreeze = true;
        }
      }
      if (refreeze) {
        nf = 0;
        for (let j = 0; j < n; j++) if (isFree[j]) free[nf++] = j;
        if (nf === 0) {
          stopReason = 'gradient-orthogonal';
          break outer;
        }
        factorFree();
        continue;
      }

      // Trial point, projected onto the box.
      let projected = false;
      for (let j = 0; j < n; j++) {
        trial[j] = x[j];
        step[j] = 0;
      }
      for (let k = 0; k < nf; k++) {
        const j = free[k];
        let t = x[j] - stepF[k];
        if (t < lower[j]) {
          t = lower[j];
          projected = true;
        } else if (t > upper[j]) {
          t = upper[j];
          projected = true;
        }
        trial[j] = t;
        step[j] = t - x[j];
      }
      const pnorm = scaledNorm(diag, step, n);
      if (pnorm === 0) {
        // The step is below the rounding of p. With the trust region still open this is the
        // Levenberg–Marquardt step itself vanishing: no double p is closer to the minimum
        // (MINPACK's "no further improvement is possible"), even when rounding of very small
        // residuals keeps the scaled gradient above a tolerance (NIST Lanczos1). Only a collapsed
        // region with a gradient left over means the solver is stuck.
        stopReason = gnorm <= 1e-8 || delta > EPS * xnorm ? 'relative-step' : 'no-progress';
        break outer;
      }
      if (iterations === 1) delta = Math.min(delta, pnorm);

      const norm1 = residualsAt(trial, ftrial);
      const ok = !Number.isNaN(norm1);
      lastTrialFailed = !ok;
      const fnorm1 = ok ? norm1 : Infinity;
      const actred = 0.1 * fnorm1 < fnorm ? 1 - (fnorm1 / fnorm) ** 2 : -1;

      // w3 = R·Pᵀ·s, so ‖J·s‖ = ‖w3‖ and rᵀJ·s = qtf·w3.
      for (let j = 0; j < nf; j++) w3[j] = 0;
      for (let j = 0; j < nf; j++) {
        const t = step[free[qrw.ipvt[j]]];
        for (let i = 0; i <= j; i++) w3[i] += R[j * nf + i] * t;
      }
      const temp1 = euclideanNorm(w3, 0, nf) / fnorm;
      let prered: number;
      let dirder: number;
      if (!projected) {
        const temp2 = (Math.sqrt(par) * pnorm) / fnorm;
        prered = temp1 * temp1 + (temp2 * temp2) / 0.5;
        dirder = -(temp1 * temp1 + temp2 * temp2);
      } else {
        let rjs = 0;
        for (let i = 0; i < nf; i++) rjs += (qtf[i] / fnorm) * (w3[i] / fnorm);
        prered = -(2 * rjs + temp1 * temp1);
        dirder = rjs;
      }
      const ratio = prered > 0 ? actred / prered : 0;

      // Trust-radius update (lmder).
      if (ratio <= 0.25) {
        let temp = actred >= 0 ? 0.5 : (0.5 * dirder) / (dirder + 0.5 * actred);
        if (0.1 * fnorm1 >= fnorm || temp < 0.1 || !Number.isFinite(temp)) temp = 0.1;
        delta = temp * Math.min(delta, pnorm / 0.1);
        par /= temp;
      } else if (par === 0 || ratio >= 0.75) {
        delta = pnorm / 0.5;
        par *= 0.5;
      }

      if (ratio >= 1e-4) {
        x.set(trial);
        fvec.set(ftrial);
        xnorm = scaledNorm(diag, x, n);
        fnorm = fnorm1;
        jacobianCurrent = false;
      }

      // Termination tests, in lmder's order.
      const smallReduction = Math.abs(actred) <= opt.ftol && prered <= opt.ftol && 0.5 * ratio <= 1;
      const smallStep = delta <= opt.xtol * xnorm;
      if (smallReduction) stopReason = 'relative-reduction';
      else if (smallStep) stopReason = 'relative-step';
      else if (evaluations >= opt.maxEvaluations) stopReason = 'max-evaluations';
      else if (Math.abs(actred) <= EPS && prered <= EPS && 0.5 * ratio <= 1)
        stopReason = 'relative-reduction';
      else if (delta <= EPS * xnorm) stopReason = 'relative-step';
      else if (gnorm <= EPS) stopReason = 'gradient-orthogonal';
      if (stopReason !== null) {
        // A radius collapsed by refused points only is a stall at the model's domain, not a minimum.
        if (lastTrialFailed && stopReason === 'relative-step') stopReason = 'not-finite';
        break outer;
      }
      if (ratio >= 1e-4) break;
    }
  }

  const reason: StopReason = stopReason ?? 'max-iterations';
  if (opt.skipCovariance) {
    return finish(
      problem,
      x,
      fvec,
      J,
      iterations,
      evaluations,
      jacobianEvaluations,
      reason,
      lower,
      upper,
      false,
      a,
    );
  }
  if (!jacobianCurrent && !(jacobianAt(x) && finite(J))) {
    // The accepted point's Jacobian is unusable; report what we have.
    return finish(
      problem,
      x,
      fvec,
      J,
      iterations,
      evaluations,
      jacobianEvaluations,
      'not-finite',
      lower,
      upper,
      false,
      a,
    );
  }
  return finish(
    problem,
    x,
    fvec,
    J,
    iterations,
    evaluations,
    jacobianEvaluations,
    reason,
    lower,
    upper,
    true,
    a,
  );
}

function scaledNorm(d: Float64Array, v: Float64Array, n: number): number {
  let s = 0;
  for (let j = 0; j < n; j++) s += (d[j] * v[j]) ** 2;
  return Math.sqrt(s);
}

function stripUndefined(o: SolveOptions): SolveOptions {
  const out: Record<string, number | boolean> = {};
  for (const [k, v] of Object.entries(o)) if (v !== undefined) out[k] = v as number | boolean;
  return out as SolveOptions;
}

function atBoundIndices(x: Float64Array, lower: Float64Array, upper: Float64Array): number[] {
  const out: number[] = [];
  for (let j = 0; j < x.length; j++) if (x[j] <= lower[j] || x[j] >= upper[j]) out.push(j);
  return out;
}

function finish(
  problem: LeastSquaresProblem,
  x: Float64Array,
  fvec: Float64Array,
  J: Float64Array,
  iterations: number,
  evaluations: number,
  jacobianEvaluations: number,
  stopReason: StopReason,
  lower: Float64Array,
  upper: Float64Array,
  jacobianUsable: boolean,
  scratchMn: Float64Array,
): SolveResult {
  const { m, n } = problem;
  const sumSquares = sumOfSquares(fvec.length === m ? fvec : fvec.subarray(0, m));
  let cov: Float64Array;
  let singularValues: Float64Array;
  let rank: number;
  if (jacobianUsable) {
    // Full pivoted QR of J at p, then the SVD of the n×n factor.
    const a = scratchMn;
    gatherColumns(J, m, n, null, n, a);
    const w = {
      ipvt: new Int32Array(n),
      rdiag: new Float64Array(n),
      acnorm: new Float64Array(n),
      wa: new Float64Array(n),
    };
    householderQr(a, m, n, true, w);
    const R = new Float64Array(n * n);
    extractR(a, m, n, w.rdiag, R);
    ({ unscaledCovariance: cov, singularValues, rank } = covarianceFromR(R, n, w.ipvt, m));
  } else {
    cov = new Float64Array(n * n).fill(NaN);
    singularValues = new Float64Array(n).fill(NaN);
    rank = 0;
  }
  return {
    p: Float64Array.from(x),
    residuals: fvec.slice(), // a copy: fvec may be a lent work buffer
    sumSquares,
    iterations,
    evaluations,
    jacobianEvaluations,
    stopReason,
    converged: CONVERGED.has(stopReason),
    rank,
    unscaledCovariance: cov,
    jacobian: J.slice(),
    singularValues,
    atBound: atBoundIndices(x, lower, upper),
  };
}

function failedStart(
  problem: LeastSquaresProblem,
  x: Float64Array,
  fvec: Float64Array,
  evaluations: number,
): SolveResult {
  const { m, n } = problem;
  const sumSquares = sumOfSquares(fvec.length === m ? fvec : fvec.subarray(0, m));
  return {
    p: Float64Array.from(x),
    residuals: fvec.slice(), // a copy: fvec may be a lent work buffer
    sumSquares: Number.isFinite(sumSquares) ? sumSquares : NaN,
    iterations: 0,
    evaluations,
    jacobianEvaluations: 0,
    stopReason: 'not-finite',
    converged: false,
    rank: 0,
    unscaledCovariance: new Float64Array(n * n).fill(NaN),
    jacobian: new Float64Array(m * n),
    singularValues: new Float64Array(n).fill(NaN),
    atBound: [],
  };
}
