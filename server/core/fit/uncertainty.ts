import { residualDiagnostics, tQuantile, type ResidualDiagnostics } from '../stats/index.js';
import type { FittedVariant } from './variant.js';

/**
 * Standard uncertainties from s²·(JᵀJ)⁻¹, corrected for serially correlated residuals.
 *
 * Logged drains have residuals that wander (slosh, waves, turbulence), and then the ordinary
 * covariance is too optimistic: at lag-1 autocorrelation ρ the variance of a coefficient on a
 * smooth regressor grows by about (1+ρ)/(1−ρ) (the AR(1) effective-sample-size correction), and
 * the information behaves as if there were only m·(1−ρ)/(1+ρ) independent samples. We apply that
 * factor when ρ > 0 and take the t quantile at the effective degrees of freedom.
 */
export interface UncertaintyModel {
  method: 'AR(1) effective sample size';
  samples: number;
  parameters: number;
  /** s² = SSR/(m − k), m². */
  residualVariance: number;
  lag1Autocorrelation: number;
  /** Factor applied to the covariance (1 when residuals are not positively correlated). */
  varianceInflation: number;
  effectiveSamples: number;
  degreesOfFreedom: number;
  /** Student-t 97.5 % quantile at degreesOfFreedom (the coverage factor for 95 %). */
  coverageFactor: number;
  /** Corrected covariance, row-major k×k, in the variant's free-parameter order. */
  covariance: Float64Array;
  standardUncertainties: Float64Array;
  correlations: Float64Array;
}

/** `diagnostics`: residualDiagnostics of the variant's residuals when the caller already has them. */
export function uncertaintyFor(
  variant: FittedVariant,
  diagnostics?: ResidualDiagnostics,
): UncertaintyModel {
  const { solve, k } = variant;
  const m = solve.residuals.length;
  const diag = diagnostics ?? residualDiagnostics(solve.residuals);
  const rho = Number.isFinite(diag.lag1Autocorrelation) ? diag.lag1Autocorrelation : 0;
  const inflation = rho > 0 ? (1 + rho) / (1 - Math.min(rho, 0.999)) : 1;
  const effectiveSamples = m / inflation;
  const dof = Math.max(effectiveSamples - k, 1);
  const s2 = solve.sumSquares / Math.max(m - k, 1);
  const covariance = new Float64Array(k * k);
  for (let i = 0; i < k * k; i++) covariance[i] = solve.unscaledCovariance[i] * s2 * inflation;
  const u = new Float64Array(k);
  for (let j = 0; j < k; j++) u[j] = Math.sqrt(Math.max(covariance[j * k + j], 0));
  const correlations = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const d = u[i] * u[j];
      correlations[i * k + j] = d > 0 ? covariance[i * k + j] / d : i === j ? 1 : 0;
    }
  }
  return {
    method: 'AR(1) effective sample size',
    samples: m,
    parameters: k,
    residualVariance: s2,
    lag1Autocorrelation: rho,
    varianceInflation: inflation,
    effectiveSamples,
    degreesOfFreedom: dof,
    coverageFactor: tQuantile(0.975, dof),
    covariance,
    standardUncertainties: u,
    correlations,
  };
}
