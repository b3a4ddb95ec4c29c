import { describe, expect, it } from 'vitest';
import { Matrix, inverse, solve } from 'ml-matrix';
import { InputError } from '../../../server/core/errors.js';
import { finiteDifferenceJacobian, solveLeastSquares } from '../../../server/core/lsq/index.js';
import type { LeastSquaresProblem } from '../../../server/core/lsq/index.js';

/** Small deterministic noise (a linear congruential generator), invented data for tests. */
function noise(count: number, scale: number, seed = 12345): Float64Array {
  const out = new Float64Array(count);
  let s = seed >>> 0;
  for (let i = 0; i < count; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = scale * (s / 2 ** 32 - 0.5);
  }
  return out;
}

/** y ≈ a·exp(−k·t), parameters [a, k]. */
function decayProblem(
  t: Float64Array,
  y: Float64Array,
  extra: Partial<LeastSquaresProblem> = {},
): LeastSquaresProblem {
  return {
    m: t.length,
    n: 2,
    evaluate(p, r, J) {
      for (let i = 0; i < t.length; i++) {
        const e = Math.exp(-p[1] * t[i]);
        r[i] = p[0] * e - y[i];
        if (J) {
          J[i * 2] = e;
          J[i * 2 + 1] = -p[0] * t[i] * e;
        }
      }
    },
    ...extra,
  };
}

function decayData(count = 40): { t: Float64Array; y: Float64Array } {
  const t = Float64Array.from({ length: count }, (_, i) => i * 0.25);
  const eps = noise(count, 0.02);
  const y = t.map((ti, i) => 2.5 * Math.exp(-0.4 * ti) + eps[i]);
  return { t, y };
}

describe('solveLeastSquares on a linear problem', () => {
  // Quadratic polynomial: the least-squares solution is the normal-equation solution
  // (JᵀJ)β = Jᵀy (ordinary linear algebra), computed here independently with ml-matrix.
  const x = Float64Array.from({ length: 30 }, (_, i) => i / 3);
  const eps = noise(30, 0.5);
  const y = x.map((xi, i) => 1 - 2 * xi + 0.3 * xi * xi + eps[i]);
  const design = new Matrix(Array.from(x, (xi) => [1, xi, xi * xi]));
  const problem: LeastSquaresProblem = {
    m: 30,
    n: 3,
    evaluate(p, r, J) {
      for (let i = 0; i < 30; i++) {
        r[i] = p[0] + p[1] * x[i] + p[2] * x[i] * x[i] - y[i];
        if (J) J.set([1, x[i], x[i] * x[i]], i * 3);
      }
    },
  };
  const res = solveLeastSquares(problem, new Float64Array([0, 0, 0]));
  const XtX = design.transpose().mmul(design);
  const beta = solve(XtX, design.transpose().mmul(Matrix.columnVector(Array.from(y))));

  it('matches the normal equations', () => {
    expect(res.converged).toBe(true);
    for (let j = 0; j < 3; j++) expect(res.p[j]).toBeCloseTo(beta.get(j, 0), 9);
    expect(res.rank).toBe(3);
  });
  it('gives (JᵀJ)⁻¹ as the unscaled covariance', () => {
    const inv = inverse(XtX);
    for (let a = 0; a < 3; a++) {
      for (let b = 0; b < 3; b++) {
        expect(res.unscaledCovariance[a * 3 + b]).toBeCloseTo(inv.get(a, b), 10);
      }
    }
  });
});

describe('rank deficiency', () => {
  it('is detected when two columns are the same', () => {
    // r = (p0 + p1)·x − y: only the sum is identified.
    const x = Float64Array.from({ length: 10 }, (_, i) => i + 1);
    const problem: LeastSquaresProblem = {
      m: 10,
      n: 2,
      evaluate(p, r, J) {
        for (let i = 0; i < 10; i++) {
          r[i] = (p[0] + p[1]) * x[i] - 3 * x[i] - (i % 2 ? 0.1 : -0.1);
          if (J) J.set([x[i], x[i]], i * 2);
        }
      },
    };
    const res = solveLeastSquares(problem, new Float64Array([1, 1]));
    expect(res.rank).toBe(1);
    expect(res.singularValues[1]).toBeLessThanOrEqual(10 * 2.2e-16 * res.singularValues[0]);
    expect(Number.isFinite(res.unscaledCovariance[0])).toBe(true);
    // The pseudo-inverse of [[s, s],[s, s]] (s = Σx²) is [[1, 1],[1, 1]]/(4s).
    const s = x.reduce((acc, v) => acc + v * v, 0);
    expect(res.unscaledCovariance[0]).toBeCloseTo(1 / (4 * s), 12);
  });
});

describe('bounds', () => {
  const { t, y } = decayData();
  it('keeps the solution inside the box and reports the active bound', () => {
    // The free fit has k ≈ 0.4; an upper bound of 0.3 must be active.
    const problem = decayProblem(t, y, {
      lower: new Float64Array([0, 0]),
      upper: new Float64Array([10, 0.3]),
    });
    const res = solveLeastSquares(problem, new Float64Array([1, 0.1]));
    expect(res.converged).toBe(true);
    expect(res.p[1]).toBe(0.3);
    expect(res.atBound).toEqual([1]);
    // With k fixed at 0.3 the best a is linear least squares: a = Σ y·e / Σ e².
    let num = 0;
    let den = 0;
    for (let i = 0; i < t.length; i++) {
      const e = Math.exp(-0.3 * t[i]);
      num += y[i] * e;
      den += e * e;
    }
    expect(res.p[0]).toBeCloseTo(num / den, 9);
  });
  it('projects a start outside the box onto it', () => {
    const problem = decayProblem(t, y, {
      lower: new Float64Array([0, 0.5]),
      upper: new Float64Array([10, 1]),
    });
    const res = solveLeastSquares(problem, new Float64Array([-5, 3]));
    expect(res.p[1]).toBe(0.5);
    expect(res.p[0]).toBeGreaterThanOrEqual(0);
    expect(res.atBound).toEqual([1]);
  });
  it('leaves an inactive box alone', () => {
    const free = solveLeastSquares(decayProblem(t, y), new Float64Array([1, 0.1]));
    const boxed = solveLeastSquares(
      decayProblem(t, y, { lower: new Float64Array([0, 0]), upper: new Float64Array([10, 5]) }),
      new Float64Array([1, 0.1]),
    );
    expect(boxed.atBound).toEqual([]);
    expect(boxed.p[0]).toBeCloseTo(free.p[0], 10);
    expect(boxed.p[1]).toBeCloseTo(free.p[1], 10);
  });
});

describe('model domain', () => {
  // Drain-like model h(t) = (c − k·t)², defined only while c − k·t ≥ 0 over the record:
  // evaluate refuses such points. Data are exact for c = 1, k = 0.099 on t ∈ [0, 10], so the
  // solution sits just inside the domain (c − 10k = 0.01) and a full first step leaves it.
  const t = Float64Array.from({ length: 21 }, (_, i) => i * 0.5);
  const h = t.map((ti) => (1 - 0.099 * ti) ** 2);
  let refused = 0;
  const problem: LeastSquaresProblem = {
    m: 21,
    n: 2,
    evaluate(p, r, J) {
      if (p[0] - p[1] * 10 < 0) {
        refused++;
        return false;
      }
      for (let i = 0; i < 21; i++) {
        const s = p[0] - p[1] * t[i];
        r[i] = s * s - h[i];
        if (J) J.set([2 * s, -2 * s * t[i]], i * 2);
      }
      return true;
    },
  };
  it('treats refused points as rejected steps and still converges', () => {
    const res = solveLeastSquares(problem, new Float64Array([0.6, 0.05]));
    expect(refused).toBeGreaterThan(0);
    expect(res.converged).toBe(true);
    expect(res.p[0]).toBeCloseTo(1, 8);
    expect(res.p[1]).toBeCloseTo(0.099, 8);
  });
  it('reports not-finite when the start itself is refused', () => {
    const res = solveLeastSquares(problem, new Float64Array([0.1, 1]));
    expect(res.stopReason).toBe('not-finite');
    expect(res.converged).toBe(false);
  });
});

describe('stop reasons', () => {
  const { t, y } = decayData();
  it('relative reduction or step on an ordinary fit', () => {
    const res = solveLeastSquares(decayProblem(t, y), new Float64Array([1, 1]));
    expect(['relative-reduction', 'relative-step']).toContain(res.stopReason);
    expect(res.converged).toBe(true);
  });
  it('max-iterations', () => {
    const res = solveLeastSquares(decayProblem(t, y), new Float64Array([1, 1]), {
      maxIterations: 1,
    });
    expect(res.stopReason).toBe('max-iterations');
    expect(res.converged).toBe(false);
  });
  it('max-evaluations', () => {
    const res = solveLeastSquares(decayProblem(t, y), new Float64Array([1, 1]), {
      maxEvaluations: 3,
    });
    expect(res.stopReason).toBe('max-evaluations');
    expect(res.converged).toBe(false);
  });
  it('gradient-orthogonal when gtol is loose', () => {
    const res = solveLeastSquares(decayProblem(t, y), new Float64Array([1, 1]), { gtol: 0.99 });
    expect(res.stopReason).toBe('gradient-orthogonal');
    expect(res.converged).toBe(true);
  });
  it('zero-residual at an exact fit', () => {
    const problem: LeastSquaresProblem = {
      m: 2,
      n: 1,
      evaluate(p, r, J) {
        r[0] = p[0] - 3;
        r[1] = 2 * (p[0] - 3);
        if (J) J.set([1, 2]);
      },
    };
    const res = solveLeastSquares(problem, new Float64Array([3]));
    expect(res.stopReason).toBe('zero-residual');
    expect(res.converged).toBe(true);
  });
  it('refuses malformed input with InputError', () => {
    expect(() => solveLeastSquares(decayProblem(t, y), new Float64Array([1]))).toThrow(InputError);
    expect(() =>
      solveLeastSquares(decayProblem(t.subarray(0, 1), y), new Float64Array([1, 1])),
    ).toThrow(InputError);
    const bad = decayProblem(t, y, {
      lower: new Float64Array([1, 1]),
      upper: new Float64Array([0, 2]),
    });
    expect(() => solveLeastSquares(bad, new Float64Array([1, 1]))).toThrow(InputError);
  });
});

describe('poor scaling and many rows', () => {
  it('fits an effective area near 1e-4 m² next to a head near 1 m over 100 000 rows', () => {
    // Torricelli drain of a vertical cylinder (common practice): sqrt(H) = sqrt(H0) − Cd·a·sqrt(2g)/(2A)·t.
    const g = 9.80665;
    const A = 0.8;
    const m = 100_000;
    const t = Float64Array.from({ length: m }, (_, i) => i * 0.02);
    const h = t.map((ti) => (Math.sqrt(1.2) - (2.3e-4 * Math.sqrt(2 * g) * ti) / (2 * A)) ** 2);
    const problem: LeastSquaresProblem = {
      m,
      n: 2,
      evaluate(p, r, J) {
        const c = Math.sqrt(2 * g) / (2 * A);
        const s0 = Math.sqrt(p[0]);
        for (let i = 0; i < m; i++) {
          const s = s0 - p[1] * c * t[i];
          r[i] = s * s - h[i];
          if (J) {
            J[i * 2] = s / s0;
            J[i * 2 + 1] = -2 * s * c * t[i];
          }
        }
        return p[0] > 0;
      },
    };
    const res = solveLeastSquares(problem, new Float64Array([1, 1e-4]));
    expect(res.converged).toBe(true);
    expect(res.p[0]).toBeCloseTo(1.2, 10);
    expect(res.p[1] / 2.3e-4).toBeCloseTo(1, 9);
  });
});

describe('finiteDifferenceJacobian', () => {
  it('agrees with the analytic Jacobian of the decay model', () => {
    const { t, y } = decayData(10);
    const problem = decayProblem(t, y);
    const p = new Float64Array([2, 0.3]);
    const fd = finiteDifferenceJacobian(problem, p);
    const J = new Float64Array(20);
    problem.evaluate(p, new Float64Array(10), J);
    for (let k = 0; k < 20; k++) expect(fd[k]).toBeCloseTo(J[k], 7);
  });
});
