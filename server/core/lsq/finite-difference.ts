/**
 * Forward-difference Jacobian, for tests that check hand-written derivatives.
 * The engine never uses it: models supply exact Jacobians.
 * Relative step: h_j = c·max(|p_j|, 1e-6), c = 6e-6 for central differences (≈ eps^(1/3)),
 * 1.5e-8 for forward ones (≈ sqrt(eps)).
 */
import type { LeastSquaresProblem } from './types.js';

export function finiteDifferenceJacobian(
  problem: LeastSquaresProblem,
  p: Float64Array,
  central = true,
): Float64Array {
  const { m, n } = problem;
  const J = new Float64Array(m * n);
  const r0 = new Float64Array(m);
  const r1 = new Float64Array(m);
  const r2 = new Float64Array(m);
  problem.evaluate(p, r0, null);
  const q = Float64Array.from(p);
  for (let j = 0; j < n; j++) {
    const h = (central ? 6e-6 : 1.5e-8) * Math.max(Math.abs(p[j]), 1e-6);
    q[j] = p[j] + h;
    problem.evaluate(q, r1, null);
    if (central) {
      q[j] = p[j] - h;
      problem.evaluate(q, r2, null);
      for (let i = 0; i < m; i++) J[i * n + j] = (r1[i] - r2[i]) / (2 * h);
    } else {
      for (let i = 0; i < m; i++) J[i * n + j] = (r1[i] - r0[i]) / h;
    }
    q[j] = p[j];
  }
  return J;
}
