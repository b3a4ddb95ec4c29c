import { tQuantile } from '../stats/index.js';
import { P, PER_VESSEL, type VesselNetwork } from './network.js';

/**
 * A system with numbers in it: the network, θ, and (after a fit) the covariance of the free
 * parameters. What `steady`, `linearize` and the predictions work from, whether it came from a
 * fit or from Cd·a values written in a system file (then without uncertainty).
 */
export interface SystemModel {
  network: VesselNetwork;
  /** Full θ (PER_VESSEL per vessel). */
  theta: Float64Array;
  /** Indices into θ that carry uncertainty, and their covariance (k×k), or none. */
  free: Int32Array;
  covariance: Float64Array | null;
  degreesOfFreedom: number;
  /** Each vessel's shape as written in its file (for exact drain integrals), when known. */
  specs?: import('../geometry/spec.js').ShapeSpec[];
}

/** The effective-area entries of the covariance: which θ index each row is, and Σ restricted to them. */
export function outletCovariance(
  model: SystemModel,
): { index: Int32Array; sigma: Float64Array } | null {
  if (!model.covariance) return null;
  const k = model.free.length;
  const rows: number[] = [];
  for (let c = 0; c < k; c++) if (model.free[c] % PER_VESSEL === P.effectiveArea) rows.push(c);
  const r = rows.length;
  const sigma = new Float64Array(r * r);
  for (let a = 0; a < r; a++)
    for (let b = 0; b < r; b++) sigma[a * r + b] = model.covariance[rows[a] * k + rows[b]];
  return { index: Int32Array.from(rows, (c) => model.free[c]), sigma };
}

export function coverageFactor(model: SystemModel): number {
  return tQuantile(0.975, model.degreesOfFreedom);
}

/** θ for operation: the fitted leak terms belong to the test (a passing valve), not the plant. */
export function operatingTheta(model: SystemModel): Float64Array {
  const th = Float64Array.from(model.theta);
  for (let i = 0; i < model.network.vessels.length; i++) th[i * PER_VESSEL + P.leak] = 0;
  return th;
}

/** A value with its standard uncertainty and a 95 % interval (t at the model's degrees of freedom). */
export interface Estimate {
  value: number;
  standardUncertainty: number | null;
  ci95: [number, number] | null;
}

export function estimate(value: number, variance: number | null, k: number): Estimate {
  if (variance === null || !Number.isFinite(variance))
    return { value, standardUncertainty: null, ci95: null };
  const u = Math.sqrt(Math.max(variance, 0));
  return { value, standardUncertainty: u, ci95: [value - k * u, value + k * u] };
}
