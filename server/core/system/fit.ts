import { InputError } from '../errors.js';
import {
  dischargeCoefficientQuantity,
  effectiveAreaQuantity,
  type GumQuantity,
} from '../fit/coefficient.js';
import {
  covarianceFromJacobian,
  solveLeastSquares,
  type LeastSquaresProblem,
  type SolveResult,
} from '../lsq/index.js';
import { residualDiagnostics, tQuantile } from '../stats/index.js';
import type { AlignedLog } from './align.js';
import { integrateSystem } from './integrate.js';
import { P, PER_VESSEL, parameterName, type InflowInput, type VesselNetwork } from './network.js';
import { startValues } from './start-values.js';

/**
 * The joint fit of connected vessels: every outlet's Cd·a, every vessel's initial reading (and
 * optionally its sensor zero and an unknown constant inflow) from all the logs at once, through
 * the coupled ODE with forward sensitivities. Residuals are stacked over the vessels, each log
 * weighted by 1/σ_i, its own noise level estimated from a first, unweighted pass.
 *
 * Uncertainty: each log's residuals have their own lag-1 autocorrelation ρ_i, so each log's
 * share of the information JᵀJ is divided by its AR(1) effective-sample-size factor
 * f_i = (1+ρ_i)/(1−ρ_i) (as fit/uncertainty.ts does for one log), and
 *   Σ = s²·(Σ_i J_iᵀJ_i / f_i)⁻¹,   ν = Σ_i m_i/f_i − k,   coverage factor t_0.975(ν).
 * With one vessel this is exactly the single-vessel correction.
 */
export interface SystemFitRequest {
  network: VesselNetwork;
  logs: readonly AlignedLog[];
  inflows?: readonly InflowInput[];
  terms?: { datum?: boolean; leak?: boolean };
}

export interface VesselDiagnostics {
  id: string;
  fileName: string;
  samples: number;
  /** sqrt(Σr²/m_i), largest |r|, and the Durbin–Watson statistic of the log's residuals. */
  rmseM: number;
  maxAbsM: number;
  durbinWatson: number;
  /** σ_i: the log's residual standard deviation, m (its weight is 1/σ_i). */
  noiseM: number;
  lag1Autocorrelation: number;
  varianceInflation: number;
  effectiveSamples: number;
}

export interface OutletResult {
  effectiveAreaM2: GumQuantity;
  dischargeCoefficient: GumQuantity & { boreContribution: number; fitContribution: number };
}

export interface SystemFitResult {
  converged: boolean;
  stopReason: string;
  iterations: number;
  /** The second (weighted) pass's solver record, its start values and the bounds it kept to. */
  solve: SolveResult;
  start: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** Full θ (PER_VESSEL per vessel) at the optimum, fixed entries included. */
  theta: Float64Array;
  free: Int32Array;
  names: string[];
  /** Corrected covariance of the free parameters, k×k row-major. */
  covariance: Float64Array;
  standardUncertainties: Float64Array;
  correlations: Float64Array;
  degreesOfFreedom: number;
  coverageFactor: number;
  vessels: VesselDiagnostics[];
  outlets: Record<string, OutletResult>;
  /** Residuals per vessel (reading − model, m), in each log's sample order. */
  residuals: Float64Array[];
  warnings: string[];
}

export function fitSystem(request: SystemFitRequest): SystemFitResult {
  const { network, logs } = request;
  const inflows = request.inflows ?? [];
  const n = network.vessels.length;
  const byVessel: AlignedLog[] = [];
  for (const l of logs) {
    if (byVessel[l.vessel])
      throw new InputError(`two logs given for vessel "${network.vessels[l.vessel].id}"`, {
        file: l.fileName,
      });
    byVessel[l.vessel] = l;
  }
  for (let i = 0; i < n; i++) {
    if (!byVessel[i])
      throw new InputError(
        `no log given for vessel "${network.vessels[i].id}": the joint fit needs every vessel's level`,
      );
  }
  const theta = new Float64Array(n * PER_VESSEL);
  const freeList: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = network.vessels[i];
    const zsUnknown = v.sensorZeroM === null;
    if (zsUnknown && !request.terms?.datum) {
      throw new InputError(
        `vessel "${v.id}" has no sensor.zeroElevationM, so its head is unknown: add it, or fit the datum`,
        { field: `vessels.${i}.sensor.zeroElevationM` },
      );
    }
    theta[i * PER_VESSEL + P.sensorZero] = v.sensorZeroM ?? 0;
    freeList.push(i * PER_VESSEL + P.effectiveArea, i * PER_VESSEL + P.initialReading);
    if (request.terms?.datum) freeList.push(i * PER_VESSEL + P.sensorZero);
    if (request.terms?.leak) freeList.push(i * PER_VESSEL + P.leak);
  }
  const free = Int32Array.from(freeList);
  const k = free.length;
  startValues(network, byVessel, inflows, theta);

  // the union of all sample times, and where each sample sits in it
  const all = Float64Array.from(new Set(byVessel.flatMap((l) => Array.from(l.timeS)))).sort();
  const slot = byVessel.map((l) => Int32Array.from(l.timeS, (t) => lowerBound(all, t)));
  const rowStart = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowStart[i + 1] = rowStart[i] + byVessel[i].timeS.length;
  const m = rowStart[n];
  if (m <= k) throw new InputError(`too few samples (${m}) for ${k} parameters`);
  const eta = new Float64Array(all.length * n);
  const sens = new Float64Array(all.length * n * k);
  const weights = new Float64Array(n).fill(1);
  const work = new Float64Array(theta.length);

  const lower = Float64Array.from(free, (p) =>
    p % PER_VESSEL === P.effectiveArea ? 0 : -Infinity,
  );
  const upper = Float64Array.from(free, () => Infinity);
  const problem: LeastSquaresProblem = {
    m,
    n: k,
    lower,
    upper,
    evaluate(p, r, J) {
      work.set(theta);
      for (let c = 0; c < k; c++) work[free[c]] = p[c];
      if (!integrateSystem(network, work, all, eta, J ? sens : null, { inflows, free }))
        return false;
      for (let i = 0; i < n; i++) {
        const l = byVessel[i];
        const zs = work[i * PER_VESSEL + P.sensorZero];
        const w = weights[i];
        for (let s = 0; s < l.timeS.length; s++) {
          const row = rowStart[i] + s;
          const u = slot[i][s];
          r[row] = w * (eta[u * n + i] - zs - l.levelM[s]);
          if (!J) continue;
          for (let c = 0; c < k; c++) {
            const own = free[c] === i * PER_VESSEL + P.sensorZero ? 1 : 0;
            J[row * k + c] = w * (sens[(u * n + i) * k + c] - own);
          }
        }
      }
      return true;
    },
  };
  const p0 = Float64Array.from(free, (p) => theta[p]);
  const first = solveLeastSquares(problem, p0);
  // noise per log from the first pass; its share of the degrees of freedom is m_i/m of k
  const sigma = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const mi = rowStart[i + 1] - rowStart[i];
    let ss = 0;
    for (let row = rowStart[i]; row < rowStart[i + 1]; row++) ss += first.residuals[row] ** 2;
    sigma[i] = Math.max(Math.sqrt(ss / Math.max(mi - (k * mi) / m, 1)), 1e-9);
    weights[i] = 1 / sigma[i];
  }
  const solve = solveLeastSquares(problem, first.p);
  for (let c = 0; c < k; c++) theta[free[c]] = solve.p[c];
  return {
    ...summarise(request, byVessel, theta, free, solve, sigma, rowStart),
    solve,
    start: p0,
    lower,
    upper,
  };
}

function summarise(
  request: SystemFitRequest,
  logs: AlignedLog[],
  theta: Float64Array,
  free: Int32Array,
  solve: SolveResult,
  sigma: Float64Array,
  rowStart: Int32Array,
): Omit<SystemFitResult, 'solve' | 'start' | 'lower' | 'upper'> {
  const { network } = request;
  const n = network.vessels.length;
  const k = free.length;
  const m = rowStart[n];
  // row weights 1/sqrt(f_i): JᵀW·J = Σ_i J_iᵀJ_i/f_i, the information of the AR(1)-corrected logs
  const rowWeight = new Float64Array(m);
  const vessels: VesselDiagnostics[] = [];
  const residuals: Float64Array[] = [];
  let effectiveTotal = 0;
  for (let i = 0; i < n; i++) {
    const mi = rowStart[i + 1] - rowStart[i];
    const res = new Float64Array(mi);
    for (let s = 0; s < mi; s++) res[s] = -solve.residuals[rowStart[i] + s] * sigma[i];
    residuals.push(res);
    const diag = residualDiagnostics(res);
    const rho0 = diag.lag1Autocorrelation;
    const rho = Number.isFinite(rho0) ? rho0 : 0;
    const f = rho > 0 ? (1 + rho) / (1 - Math.min(rho, 0.999)) : 1;
    effectiveTotal += mi / f;
    rowWeight.fill(1 / Math.sqrt(f), rowStart[i], rowStart[i + 1]);
    let ss = 0;
    let maxAbs = 0;
    for (const x of res) {
      ss += x * x;
      maxAbs = Math.max(maxAbs, Math.abs(x));
    }
    vessels.push({
      id: network.vessels[i].id,
      fileName: logs[i].fileName,
      samples: mi,
      rmseM: diag.rmse,
      maxAbsM: maxAbs,
      durbinWatson: diag.durbinWatson,
      noiseM: Math.sqrt(ss / Math.max(mi - (k * mi) / m, 1)),
      lag1Autocorrelation: rho,
      varianceInflation: f,
      effectiveSamples: mi / f,
    });
  }
  const warnings: string[] = [];
  const s2 = solve.sumSquares / Math.max(m - k, 1);
  const svd = covarianceFromJacobian(solve.jacobian, m, k, rowWeight);
  const inv = svd.rank === k ? svd.unscaledCovariance : null;
  if (!inv)
    warnings.push(
      'the parameters cannot all be told apart from these logs (singular information matrix): the uncertainties are not defined',
    );
  const covariance = inv ? inv.map((x) => x * s2) : new Float64Array(k * k).fill(NaN);
  const u = Float64Array.from({ length: k }, (_, j) =>
    Math.sqrt(Math.max(covariance[j * k + j], 0)),
  );
  const correlations = new Float64Array(k * k);
  for (let a = 0; a < k; a++)
    for (let b = 0; b < k; b++)
      correlations[a * k + b] = a === b ? 1 : covariance[a * k + b] / (u[a] * u[b]);
  const dof = Math.max(effectiveTotal - k, 1);
  const outlets: Record<string, OutletResult> = {};
  for (let i = 0; i < n; i++) {
    const v = network.vessels[i];
    const c = free.indexOf(i * PER_VESSEL + P.effectiveArea);
    const value = theta[i * PER_VESSEL + P.effectiveArea];
    outlets[v.id] = {
      effectiveAreaM2: effectiveAreaQuantity(value, u[c], dof),
      dischargeCoefficient: dischargeCoefficientQuantity(
        value,
        u[c],
        dof,
        v.boreM,
        v.boreToleranceM,
      ),
    };
  }
  if (!solve.converged)
    warnings.push(`the solver stopped without converging (${solve.stopReason})`);
  for (let a = 0; a < k; a++) {
    for (let b = a + 1; b < k; b++) {
      if (
        free[a] % PER_VESSEL === P.effectiveArea &&
        free[b] % PER_VESSEL === P.effectiveArea &&
        Math.abs(correlations[a * k + b]) > 0.95
      ) {
        warnings.push(
          `${parameterName(network, free[a])} and ${parameterName(network, free[b])} are correlated at ${correlations[a * k + b].toFixed(3)}: these logs barely separate the two outlets`,
        );
      }
    }
  }
  for (const [id, o] of Object.entries(outlets)) {
    const cd = o.dischargeCoefficient.value;
    if (!(cd >= 0.5 && cd <= 1.0))
      warnings.push(
        `${id}: Cd ${cd.toPrecision(3)} lies outside 0.5–1.0 (common practice): check the bore, the geometry, the connections and the logs`,
      );
  }
  return {
    converged: solve.converged,
    stopReason: solve.stopReason,
    iterations: solve.iterations,
    theta,
    free,
    names: Array.from(free, (p) => parameterName(network, p)),
    covariance,
    standardUncertainties: u,
    correlations,
    degreesOfFreedom: dof,
    coverageFactor: tQuantile(0.975, dof),
    vessels,
    outlets,
    residuals,
    warnings,
  };
}

function lowerBound(a: Float64Array, t: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (a[mid] < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
