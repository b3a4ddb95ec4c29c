import { describe, expect, it } from 'vitest';
import { covarianceFromJacobian } from '../../../server/core/lsq/index.js';

describe('covarianceFromJacobian (SVD, ml-matrix)', () => {
  // Straight line y = a + b·t, ordinary least squares (any statistics text): with
  // Sxx = Σ(t − t̄)², Var(b) = 1/Sxx, Var(a) = Σt²/(m·Sxx), Cov(a, b) = −t̄/Sxx (σ = 1).
  const t = [0, 1, 2, 3.5, 5, 8, 13];
  const m = t.length;
  const jac = Float64Array.from(t.flatMap((x) => [1, x]));
  const mean = t.reduce((s, x) => s + x, 0) / m;
  const sxx = t.reduce((s, x) => s + (x - mean) ** 2, 0);
  const sumSq = t.reduce((s, x) => s + x * x, 0);

  it('gives the straight line closed form', () => {
    const c = covarianceFromJacobian(jac, m, 2, new Float64Array(m).fill(1));
    expect(c.rank).toBe(2);
    expect(c.unscaledCovariance[0]).toBeCloseTo(sumSq / (m * sxx), 12);
    expect(c.unscaledCovariance[3]).toBeCloseTo(1 / sxx, 12);
    expect(c.unscaledCovariance[1]).toBeCloseTo(-mean / sxx, 12);
    expect(c.unscaledCovariance[2]).toBeCloseTo(-mean / sxx, 12);
  });

  it('row weights w scale the information by w² (every row halved: covariance × 4)', () => {
    const c = covarianceFromJacobian(jac, m, 2, new Float64Array(m).fill(0.5));
    expect(c.unscaledCovariance[3]).toBeCloseTo(4 / sxx, 12);
  });

  it('keeps the digits of columns of very different size, and says when columns cannot be told apart', () => {
    const scaled = Float64Array.from(t.flatMap((x) => [1e-6, x * 1e3]));
    const c = covarianceFromJacobian(scaled, m, 2, new Float64Array(m).fill(1));
    expect(c.unscaledCovariance[0] / ((sumSq / (m * sxx)) * 1e12) - 1).toBeCloseTo(0, 10);
    const twin = Float64Array.from(t.flatMap((x) => [x, 2 * x]));
    expect(covarianceFromJacobian(twin, m, 2, new Float64Array(m).fill(1)).rank).toBe(1);
  });
});
