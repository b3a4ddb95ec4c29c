import { THETA, THETA_SIZE, type DrainSetting } from '../drain/parameters.js';
import { predictReadings, solutionFor } from '../drain/predict.js';
import type { SensorPlan } from './schema.js';

/**
 * Type A standard uncertainty of Cd·a a planned test should reach, from the Fisher information of
 * its sampling: cov = σ²·(JᵀJ)⁻¹ · (1+ρ)/(1−ρ), the same covariance and the same AR(1)
 * effective-sample-size factor the fit applies (server/core/fit/uncertainty.ts), with J the
 * model's exact Jacobian at the planned samples (Cd·a, the first reading, and the sensor zero when
 * the fit must free it). σ² = noise² + q²/12: the resolution q read as a rectangular distribution
 * of half-width q/2 (JCGM 100:2008 F.2.2.1); the rounding error is white, so the lag-1
 * correlation the fit will see is ρ·noise²/σ².
 */
export interface NoiseModel {
  varianceM2: number;
  lag1: number;
  inflation: number;
}

export function noiseModel(sensor: SensorPlan): NoiseModel {
  const quant = (sensor.resolutionM * sensor.resolutionM) / 12;
  const noise2 = sensor.noiseM * sensor.noiseM;
  const varianceM2 = noise2 + quant;
  const lag1 = varianceM2 > 0 ? (sensor.noiseLag1 * noise2) / varianceM2 : 0;
  return { varianceM2, lag1, inflation: lag1 > 0 ? (1 + lag1) / (1 - lag1) : 1 };
}

export interface PlannedWindow {
  setting: DrainSetting;
  effectiveAreaM2: number;
  /** Surface elevation at the window's start, m above the vessel bottom. */
  startSurfaceM: number;
  sensorZeroM: number;
  datumFitted: boolean;
  sampleIntervalS: number;
  /** Samples in the longest window considered. */
  samples: number;
}

/**
 * u(Cd·a)/Cd·a for every window length 1..samples (index i = window of i+1 samples; NaN while the
 * information is singular). Adding samples only adds information, so the sequence never rises.
 */
export function relativeTypeAByLength(w: PlannedWindow, noise: NoiseModel): Float64Array {
  const m = w.samples;
  const free = w.datumFitted
    ? Int32Array.of(THETA.effectiveArea, THETA.initialReading, THETA.sensorZero)
    : Int32Array.of(THETA.effectiveArea, THETA.initialReading);
  const k = free.length;
  const theta = new Float64Array(THETA_SIZE);
  theta[THETA.effectiveArea] = w.effectiveAreaM2;
  theta[THETA.sensorZero] = w.sensorZeroM;
  theta[THETA.initialReading] = w.startSurfaceM - w.sensorZeroM;
  theta[THETA.exponent] = 0.5;
  const timeS = new Float64Array(m);
  for (let i = 0; i < m; i++) timeS[i] = i * w.sampleIntervalS;
  const readings = new Float64Array(m);
  const jac = new Float64Array(m * k);
  if (
    !predictReadings(w.setting, solutionFor(w.setting, false), theta, timeS, readings, jac, free)
  ) {
    throw new RangeError('planned drain outside the model domain');
  }
  return prefixInverseCorner(jac, m, k, noise.varianceM2 * noise.inflation, w.effectiveAreaM2);
}

/** Running JᵀJ over the rows; at each row √(scale·[(JᵀJ)⁻¹]₀₀)/value. */
function prefixInverseCorner(
  jac: Float64Array,
  m: number,
  k: number,
  scale: number,
  value: number,
): Float64Array {
  const out = new Float64Array(m);
  const a = new Float64Array(k * k);
  for (let i = 0; i < m; i++) {
    const row = i * k;
    for (let p = 0; p < k; p++)
      for (let q = p; q < k; q++) a[p * k + q] += jac[row + p] * jac[row + q];
    out[i] = Math.sqrt(scale * inverseCorner(a, k)) / value;
  }
  return out;
}

/** [(A)⁻¹]₀₀ for a symmetric 2×2 or 3×3 A given by its upper triangle; NaN when singular. */
function inverseCorner(a: Float64Array, k: number): number {
  if (k === 2) {
    const det = a[0] * a[3] - a[1] * a[1];
    return det > 1e-12 * a[0] * a[3] ? a[3] / det : NaN;
  }
  const [a00, a01, a02, , a11, a12, , , a22] = [a[0], a[1], a[2], 0, a[4], a[5], 0, 0, a[8]];
  const c00 = a11 * a22 - a12 * a12;
  const det = a00 * c00 - a01 * (a01 * a22 - a12 * a02) + a02 * (a01 * a12 - a11 * a02);
  return det > 1e-12 * a00 * a11 * a22 && c00 > 0 ? c00 / det : NaN;
}
