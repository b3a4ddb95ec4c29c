import { InputError } from '../errors.js';
import { fCdf } from './distributions.js';

/**
 * Akaike's criterion for a least-squares fit with Gaussian errors of unknown variance, in the
 * form of Burnham & Anderson, "Model Selection and Multimodel Inference" (2nd ed., 2002), §2.2
 * (from memory): with σ̂² = S/n the maximum-likelihood variance,
 *   AIC  = n·ln(S/n) + 2K,   AICc = AIC + 2K(K + 1)/(n − K − 1),
 * where K = k + 1 counts the k fitted parameters plus the variance. The additive constant
 * n·(ln 2π + 1) is dropped: only differences between models fitted to the same data mean
 * anything. AICc is Infinity when n ≤ K + 1 (too few points to support the model).
 */
export function akaike(sumSquares: number, n: number, k: number): { aic: number; aicc: number } {
  if (!(sumSquares > 0) || !Number.isFinite(sumSquares)) {
    throw new InputError(`sum of squares must be a positive finite number (got ${sumSquares})`);
  }
  if (!Number.isInteger(n) || n < 1)
    throw new InputError(`number of points must be a positive integer (got ${n})`);
  if (!Number.isInteger(k) || k < 0)
    throw new InputError(`number of parameters must be a whole number (got ${k})`);
  const K = k + 1;
  const aic = n * Math.log(sumSquares / n) + 2 * K;
  const room = n - K - 1;
  return { aic, aicc: room > 0 ? aic + (2 * K * (K + 1)) / room : Number.POSITIVE_INFINITY };
}

/**
 * The extra-sum-of-squares F test of a small model nested in a large one (the large one adds
 * kLarge − kSmall parameters): F = [(S_small − S_large)/(k_L − k_S)] / [S_large/(n − k_L)],
 * compared with F(k_L − k_S, n − k_L). A small p-value says the extra parameters earn their
 * place. Exact for linear models with Gaussian errors, approximate for nonlinear ones. A
 * large model that fits worse (F < 0, from a solver stopping short) gets p = 1.
 */
export function nestedFTest(
  ssrSmall: number,
  kSmall: number,
  ssrLarge: number,
  kLarge: number,
  n: number,
): { f: number; dof1: number; dof2: number; pValue: number } {
  for (const [v, name] of [
    [ssrSmall, 'small-model sum of squares'],
    [ssrLarge, 'large-model sum of squares'],
  ] as const) {
    if (!(v >= 0) || !Number.isFinite(v))
      throw new InputError(`${name} must be a finite number ≥ 0 (got ${v})`);
  }
  if (!Number.isInteger(kSmall) || !Number.isInteger(kLarge) || kSmall < 0 || kLarge <= kSmall) {
    throw new InputError(
      `the large model must have more parameters than the small one (got ${kLarge} and ${kSmall})`,
    );
  }
  if (!Number.isInteger(n) || n <= kLarge) {
    throw new InputError(`need more points (${n}) than parameters of the large model (${kLarge})`);
  }
  const dof1 = kLarge - kSmall;
  const dof2 = n - kLarge;
  if (ssrLarge === 0) {
    const f = ssrSmall > 0 ? Number.POSITIVE_INFINITY : Number.NaN;
    return { f, dof1, dof2, pValue: ssrSmall > 0 ? 0 : 1 };
  }
  const f = (ssrSmall - ssrLarge) / dof1 / (ssrLarge / dof2);
  return { f, dof1, dof2, pValue: f > 0 ? 1 - fCdf(f, dof1, dof2) : 1 };
}
