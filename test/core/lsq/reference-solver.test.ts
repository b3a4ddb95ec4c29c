import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { solveLeastSquares } from '../../../server/core/lsq/index.js';
import type { LeastSquaresProblem } from '../../../server/core/lsq/index.js';

// Independent reference solver: ml-levenberg-marquardt 5.1.0 (npm). Its weaknesses (STACK-NOTES):
// it stops only on an absolute error below errorTolerance or at maxIterations, its default finite
// difference step is an absolute 0.1 and its damping is additive. So it is given the analytic
// Jacobian, a well-scaled problem (both parameters of order 1), errorTolerance 0 so that it runs
// its full iteration budget, and a start close enough for its clamps never to engage.
describe('exponential decay against ml-levenberg-marquardt', () => {
  // Invented data: y = 3·exp(−0.7·t) plus a deterministic ripple standing in for noise.
  const t = Array.from({ length: 50 }, (_, i) => i * 0.1);
  const y = t.map((ti, i) => 3 * Math.exp(-0.7 * ti) + 0.03 * Math.sin(1.7 * i));
  const problem: LeastSquaresProblem = {
    m: 50,
    n: 2,
    evaluate(p, r, J) {
      for (let i = 0; i < 50; i++) {
        const e = Math.exp(-p[1] * t[i]);
        r[i] = p[0] * e - y[i];
        if (J) J.set([e, -p[0] * t[i] * e], i * 2);
      }
    },
  };

  it('reaches the same minimum', () => {
    const ours = solveLeastSquares(problem, new Float64Array([1, 0.3]));
    const ref = levenbergMarquardt(
      { x: t, y },
      ([a, k]: number[]) =>
        (x: number) =>
          a * Math.exp(-k * x),
      {
        initialValues: [1, 0.3],
        jacobianFunction:
          ([a, k]: number[]) =>
          (x: number) => [Math.exp(-k * x), -a * x * Math.exp(-k * x)],
        maxIterations: 500,
        errorTolerance: 0,
        damping: 1e-2,
      },
    );
    expect(ours.converged).toBe(true);
    expect(ours.p[0]).toBeCloseTo(ref.parameterValues[0], 6);
    expect(ours.p[1]).toBeCloseTo(ref.parameterValues[1], 6);
    // Its parameterError is the sum of squared residuals: ours must be no worse.
    expect(ours.sumSquares).toBeLessThanOrEqual(ref.parameterError * (1 + 1e-12));
  });
});
