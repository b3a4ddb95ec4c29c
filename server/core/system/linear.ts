import { integrateRk4, type OdeProblem } from '../ode/rk4.js';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { propagate } from './matrix.js';
import {
  coverageFactor,
  estimate,
  operatingTheta,
  outletCovariance,
  type Estimate,
  type SystemModel,
} from './model.js';
import { netFlows, rateWork } from './rates.js';
import { equilibrium } from './steady.js';

/**
 * The linear model about an operating point (the equilibrium for the given inflows):
 *   dx/dt = A·x + B·u,  y = C·x,  x_i = η_i − η*_i,  u_j = extra inflow into vessel j,  C = I,
 * with A = ∂f/∂η = diag(1/A_i(η*))·∂net/∂η (the area-slope term vanishes because net = 0 there)
 * and B = diag(1/A_i(η*)). For one free vessel A = −1/τ, τ = 2·A·sqrt(H0)/(Cd·a·sqrt(2g)).
 * Uncertainty by the delta method; the derivatives of (A, B, τ) with respect to each Cd·a are
 * central differences (relative step 1e-5) of this exact map, equilibrium included.
 */
export interface LinearModel {
  ids: string[];
  operatingLevelsM: number[];
  inflowM3S: number[];
  /** n×n, row-major, 1/s. */
  a: Estimate[];
  /** n×n, row-major (diagonal), 1/m². */
  b: Estimate[];
  /** Each vessel's own time constant −1/A_ii (the others held), s. */
  timeConstantsS: Estimate[];
  /** Time constants of the coupled modes, −1/Re(λ) for the eigenvalues λ of A, slowest first, s. */
  modeTimeConstantsS: number[];
}

interface Core {
  a: Float64Array;
  b: Float64Array;
  tau: Float64Array;
  eta: Float64Array;
}

function linearCore(model: SystemModel, theta: Float64Array, q: Float64Array): Core {
  const n = model.network.vessels.length;
  const { eta } = equilibrium(model, theta, q);
  const w = rateWork(n);
  const dNet = new Float64Array(n * n);
  netFlows(
    model.network,
    theta,
    Array.from(q, (x, i) => ({ vessel: i, constantM3S: x })),
    0,
    eta,
    new Float64Array(n),
    dNet,
    w,
  );
  const a = new Float64Array(n * n);
  const b = new Float64Array(n * n);
  const tau = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const area = model.network.vessels[i].shape.areaM2(eta[i]);
    for (let j = 0; j < n; j++) a[i * n + j] = dNet[i * n + j] / area;
    b[i * n + i] = 1 / area;
    tau[i] = -1 / a[i * n + i];
  }
  return { a, b, tau, eta };
}

export function linearize(model: SystemModel, inflowM3S: Float64Array): LinearModel {
  const n = model.network.vessels.length;
  const theta = operatingTheta(model);
  const base = linearCore(model, theta, inflowM3S);
  const cov = outletCovariance(model);
  const size = 2 * n * n + n;
  let variance: Float64Array | null = null;
  if (cov) {
    const r = cov.index.length;
    const g = new Float64Array(size * r);
    for (let c = 0; c < r; c++) {
      const p = cov.index[c];
      const h = 1e-5 * Math.abs(theta[p]);
      const up = Float64Array.from(theta);
      const down = Float64Array.from(theta);
      up[p] += h;
      down[p] -= h;
      const hi = flatten(linearCore(model, up, inflowM3S));
      const lo = flatten(linearCore(model, down, inflowM3S));
      for (let e = 0; e < size; e++) g[e * r + c] = (hi[e] - lo[e]) / (2 * h);
    }
    const full = propagate(g, cov.sigma, size, r);
    variance = Float64Array.from({ length: size }, (_, e) => full[e * size + e]);
  }
  const k = coverageFactor(model);
  const flat = flatten(base);
  const at = (e: number) => estimate(flat[e], variance ? variance[e] : null, k);
  const eig = new EigenvalueDecomposition(
    new Matrix(Array.from({ length: n }, (_, i) => Array.from(base.a.subarray(i * n, i * n + n)))),
  );
  const modes = eig.realEigenvalues.map((re) => -1 / re).sort((x, y) => y - x);
  return {
    ids: model.network.vessels.map((v) => v.id),
    operatingLevelsM: Array.from(base.eta),
    inflowM3S: Array.from(inflowM3S),
    a: Array.from({ length: n * n }, (_, e) => at(e)),
    b: Array.from({ length: n * n }, (_, e) => at(n * n + e)),
    timeConstantsS: Array.from({ length: n }, (_, i) => at(2 * n * n + i)),
    modeTimeConstantsS: modes,
  };
}

function flatten(c: Core): Float64Array {
  const out = new Float64Array(c.a.length * 2 + c.tau.length);
  out.set(c.a, 0);
  out.set(c.b, c.a.length);
  out.set(c.tau, 2 * c.a.length);
  return out;
}

/** The linear model's response x(t) to a constant input step du from x = 0 (the one RK4, ode/rk4.ts; for checks). */
export function linearStepResponse(
  a: Float64Array,
  b: Float64Array,
  du: Float64Array,
  n: number,
  tS: number,
  steps: number,
): Float64Array {
  const bu = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) bu[i] += b[i * n + j] * du[j];
  const x = new Float64Array(n);
  const problem: OdeProblem = {
    dim: n,
    breaks: new Float64Array(0),
    rates: (_t, v, dv) => {
      for (let i = 0; i < n; i++) {
        let s = bu[i];
        for (let j = 0; j < n; j++) s += a[i * n + j] * v[j];
        dv[i] = s;
      }
    },
    stepS: () => tS / steps,
    settle: () => false,
    write: (_index, state) => x.set(state.subarray(0, n)),
  };
  integrateRk4(problem, new Float64Array(n), Float64Array.of(tS));
  return x;
}
