import { InputError } from '../errors.js';

export interface ResidualDiagnostics {
  n: number;
  /** sqrt(Σr²/n). */
  rmse: number;
  mean: number;
  /**
   * r₁ = Σₜ(rₜ − r̄)(rₜ₊₁ − r̄) / Σₜ(rₜ − r̄)², the usual sample autocorrelation at lag 1;
   * NaN when n < 2 or the residuals are all equal (undefined, not zero).
   */
  lag1Autocorrelation: number;
  /** d = Σ(rₜ − rₜ₋₁)² / Σrₜ², near 2 for independent residuals, near 0 for strongly correlated; NaN when n < 2 or all zero. */
  durbinWatson: number;
}

/**
 * What the residuals of a fit say about the noise. Drain-test residuals at 1 Hz are often
 * strongly correlated (sloshing, waves), which the lag-1 autocorrelation exposes and which
 * makes naive parameter intervals too narrow.
 */
export function residualDiagnostics(r: Float64Array): ResidualDiagnostics {
  const n = r.length;
  if (n === 0) throw new InputError('no residuals to diagnose');
  let sum = 0;
  let sumSq = 0;
  for (let i = 0; i < n; i++) {
    sum += r[i];
    sumSq += r[i] * r[i];
  }
  const mean = sum / n;
  let dev2 = 0;
  let lagged = 0;
  let diff2 = 0;
  for (let i = 0; i < n; i++) {
    const d = r[i] - mean;
    dev2 += d * d;
    if (i + 1 < n) {
      lagged += d * (r[i + 1] - mean);
      const step = r[i + 1] - r[i];
      diff2 += step * step;
    }
  }
  return {
    n,
    rmse: Math.sqrt(sumSq / n),
    mean,
    lag1Autocorrelation: n >= 2 && dev2 > 0 ? lagged / dev2 : Number.NaN,
    durbinWatson: n >= 2 && sumSq > 0 ? diff2 / sumSq : Number.NaN,
  };
}
