import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';

/** Thin wrappers over ml-matrix for row-major Float64Array matrices of a few to a few dozen rows. */

function toMatrix(a: Float64Array, rows: number, cols: number): Matrix {
  const m = new Matrix(rows, cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) m.set(i, j, a[i * cols + j]);
  return m;
}

function toArray(m: Matrix): Float64Array {
  return Float64Array.from(m.to1DArray());
}

/** Solve A·X = B for X (A n×n, B n×r) by LU with partial pivoting; null when A is singular to working precision. */
export function solve(a: Float64Array, b: Float64Array, n: number, r: number): Float64Array | null {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i]));
  if (!(scale > 0)) return null;
  const lu = new LuDecomposition(toMatrix(a, n, n));
  const u = lu.upperTriangularMatrix;
  for (let i = 0; i < n; i++) if (!(Math.abs(u.get(i, i)) > 1e-14 * scale)) return null;
  return toArray(lu.solve(toMatrix(b, n, r)));
}

/**
 * A square root F (F·Fᵀ = A) of a covariance, for drawing correlated samples: V·diag(√λ) from
 * the symmetric eigen-decomposition, tiny negative eigenvalues (rounding) taken as 0, so a
 * semidefinite covariance (a parameter held fixed) still gives one.
 */
export function covarianceRoot(a: Float64Array, n: number): Float64Array {
  const eig = new EigenvalueDecomposition(toMatrix(a, n, n), { assumeSymmetric: true });
  const v = eig.eigenvectorMatrix;
  const f = new Float64Array(n * n);
  eig.realEigenvalues.forEach((lambda, j) => {
    const s = Math.sqrt(Math.max(lambda, 0));
    for (let i = 0; i < n; i++) f[i * n + j] = v.get(i, j) * s;
  });
  return f;
}

/** G·Σ·Gᵀ for G (r×k) and Σ (k×k): the delta method's covariance of r derived quantities. */
export function propagate(
  g: Float64Array,
  sigma: Float64Array,
  r: number,
  k: number,
): Float64Array {
  const gm = toMatrix(g, r, k);
  return toArray(gm.mmul(toMatrix(sigma, k, k)).mmul(gm.transpose()));
}
