import { InputError } from '../errors.js';
import { seededRandom } from '../random/prng.js';
import { covarianceRoot, propagate, solve } from './matrix.js';
import {
  coverageFactor,
  estimate,
  operatingTheta,
  outletCovariance,
  type Estimate,
  type SystemModel,
} from './model.js';
import { P, PER_VESSEL, type InflowInput } from './network.js';
import { netFlows, netParameterColumn, rateWork } from './rates.js';

/**
 * The equilibrium of connected vessels under constant inflows: net_i(η) = 0 for every vessel,
 * solved by Newton's method on the coupled equations (with backtracking), started from the
 * free-chain levels (every outlet taken as free: Cd_i·a_i·sqrt(2g·H_i) = Q_i). Its exact
 * sensitivities come from the implicit function theorem, ∂(η*)/∂θ = −(∂net/∂η)⁻¹·∂net/∂θ, and the
 * delta method turns the fit's covariance into the levels' covariance.
 */
export interface SteadyState {
  /** Surface elevation above each vessel's lowest interior point, m. */
  levelsM: Estimate[];
  /** Head over each outlet at equilibrium (free: above the outlet; submerged: surface difference), m. */
  headsM: number[];
  /** Flow through each outlet, m³/s. */
  flowsM3S: number[];
  /** Covariance of the levels (n×n), or null without a fit's covariance. */
  covariance: Float64Array | null;
  /** ∂(η*)/∂θ for the outlets' Cd·a (n × r, r = outlets with uncertainty). */
  sensitivity: Float64Array | null;
  iterations: number;
  warnings: string[];
}

export function inflowVector(n: number, inflows: readonly InflowInput[]): Float64Array {
  const q = new Float64Array(n);
  for (const f of inflows) {
    if (f.constantM3S === undefined)
      throw new InputError('a steady state needs constant inflows, not a logged one');
    q[f.vessel] += f.constantM3S;
  }
  return q;
}

/** The free-chain start: flows from the top down, each head from the outlet law alone. */
function freeChainLevels(model: SystemModel, theta: Float64Array, q: Float64Array): Float64Array {
  const { vessels } = model.network;
  const n = vessels.length;
  const through = Float64Array.from(q);
  // a vessel's throughflow is its own inflow plus all its upstream vessels' (a tree)
  for (let i = 0; i < n; i++) {
    let r = vessels[i].receiver;
    while (r >= 0) {
      through[r] += q[i];
      r = vessels[r].receiver;
    }
  }
  return Float64Array.from(vessels, (v, i) => {
    const c = theta[i * PER_VESSEL + P.effectiveArea];
    return v.outletElevationM + (through[i] / c) ** 2 / (2 * model.network.gravity);
  });
}

export function equilibrium(
  model: SystemModel,
  theta: Float64Array,
  q: Float64Array,
): { eta: Float64Array; iterations: number } {
  const n = model.network.vessels.length;
  const inflows: InflowInput[] = Array.from(q, (x, i) => ({ vessel: i, constantM3S: x }));
  const w = rateWork(n);
  const eta = freeChainLevels(model, theta, q);
  const net = new Float64Array(n);
  const dNet = new Float64Array(n * n);
  const trial = new Float64Array(n);
  const trialNet = new Float64Array(n);
  const scale = Math.max(...q, 1e-12);
  const size = (v: Float64Array) => Math.hypot(...v);
  netFlows(model.network, theta, inflows, 0, eta, net, dNet, w);
  let it = 0;
  for (; it < 200 && size(net) > 1e-13 * scale; it++) {
    const step = solve(dNet, net, n, 1);
    if (!step)
      throw new InputError(
        'the steady state cannot be found: the equations are singular (an outlet with no area?)',
      );
    let lambda = 1;
    const before = size(net);
    for (;;) {
      for (let i = 0; i < n; i++) trial[i] = eta[i] - lambda * step[i];
      netFlows(model.network, theta, inflows, 0, trial, trialNet, null, w);
      if (size(trialNet) < before || lambda < 1e-6) break;
      lambda /= 2;
    }
    eta.set(trial);
    netFlows(model.network, theta, inflows, 0, eta, net, dNet, w);
  }
  return { eta, iterations: it };
}

/** η* and its sensitivities to the given θ indices (n × r). */
export function equilibriumSensitivity(
  model: SystemModel,
  theta: Float64Array,
  eta: Float64Array,
  q: Float64Array,
  index: Int32Array,
): Float64Array {
  const n = model.network.vessels.length;
  const r = index.length;
  const w = rateWork(n);
  const net = new Float64Array(n);
  const dNet = new Float64Array(n * n);
  const inflows: InflowInput[] = Array.from(q, (x, i) => ({ vessel: i, constantM3S: x }));
  netFlows(model.network, theta, inflows, 0, eta, net, dNet, w);
  const rhs = new Float64Array(n * r);
  const col = new Float64Array(n);
  for (let c = 0; c < r; c++) {
    netParameterColumn(model.network, index[c], w, col);
    for (let i = 0; i < n; i++) rhs[i * r + c] = -col[i];
  }
  const s = solve(dNet, rhs, n, r);
  if (!s) throw new InputError('the steady state is singular: its sensitivities are not defined');
  return s;
}

export function steadyState(model: SystemModel, inflowM3S: Float64Array): SteadyState {
  const { network } = model;
  const n = network.vessels.length;
  if (inflowM3S.some((x) => !(x >= 0)))
    throw new InputError('inflows must be non-negative numbers');
  const theta = operatingTheta(model);
  const { eta, iterations } = equilibrium(model, theta, inflowM3S);
  const cov = outletCovariance(model);
  let covariance: Float64Array | null = null;
  let sensitivity: Float64Array | null = null;
  if (cov) {
    sensitivity = equilibriumSensitivity(model, theta, eta, inflowM3S, cov.index);
    covariance = propagate(sensitivity, cov.sigma, n, cov.index.length);
  }
  const k = coverageFactor(model);
  const warnings: string[] = [];
  const flows: number[] = [];
  const heads: number[] = [];
  const w = rateWork(n);
  netFlows(network, theta, [], 0, eta, new Float64Array(n), null, w);
  network.vessels.forEach((v, i) => {
    const c = theta[i * PER_VESSEL + P.effectiveArea];
    flows.push(c * w.perArea[i]);
    heads.push((w.perArea[i] * Math.abs(w.perArea[i])) / (2 * network.gravity));
    if (eta[i] > v.shape.heightM) {
      warnings.push(
        `${v.id}: the equilibrium level ${eta[i].toFixed(3)} m is above the vessel's height ${v.shape.heightM} m: at this inflow it would overflow`,
      );
    }
  });
  return {
    levelsM: Array.from(eta, (x, i) => estimate(x, covariance ? covariance[i * n + i] : null, k)),
    headsM: heads,
    flowsM3S: flows,
    covariance,
    sensitivity,
    iterations,
    warnings,
  };
}

/** Standard deviations of the equilibrium levels over draws of Cd·a from the covariance (a check of the delta method). */
export function steadyStateMonteCarlo(
  model: SystemModel,
  inflowM3S: Float64Array,
  draws: number,
  seed: number,
): Float64Array {
  const cov = outletCovariance(model);
  if (!cov) throw new InputError('Monte Carlo needs a covariance (a fit)');
  const n = model.network.vessels.length;
  const r = cov.index.length;
  const l = covarianceRoot(cov.sigma, r);
  const rng = seededRandom(seed);
  const base = operatingTheta(model);
  const sum = new Float64Array(n);
  const sum2 = new Float64Array(n);
  const z = new Float64Array(r);
  for (let d = 0; d < draws; d++) {
    for (let a = 0; a < r; a++) z[a] = rng.normal();
    const th = Float64Array.from(base);
    for (let a = 0; a < r; a++) {
      let s = 0;
      for (let b = 0; b < r; b++) s += l[a * r + b] * z[b];
      th[cov.index[a]] += s;
    }
    const { eta } = equilibrium(model, th, inflowM3S);
    for (let i = 0; i < n; i++) {
      sum[i] += eta[i];
      sum2[i] += eta[i] * eta[i];
    }
  }
  return Float64Array.from(sum, (s, i) =>
    Math.sqrt(Math.max(sum2[i] / draws - (s / draws) ** 2, 0) * (draws / (draws - 1))),
  );
}
