/**
 * (JᵀJ)⁻¹ from the SVD of the small triangular factor R of J·P = Q·R, on ml-matrix's
 * linear algebra. With R = U·S·Vᵀ, JᵀJ = P·V·S²·Vᵀ·Pᵀ, so no m×n product is ever formed.
 * Singular values at or below max(m,n)·eps·σ_max count as zero: their directions are
 * dropped (pseudo-inverse) and the rank says so.
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';

const EPS = 2.220446049250313e-16;

export interface CovarianceFromR {
  unscaledCovariance: Float64Array;
  singularValues: Float64Array;
  rank: number;
}

/** R is n×n column-major; column j of R belongs to parameter ipvt[j]. */
export function covarianceFromR(
  R: Float64Array,
  n: number,
  ipvt: Int32Array,
  m: number,
): CovarianceFromR {
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    for (let j = 0; j < n; j++) row[j] = R[j * n + i];
    rows.push(row);
  }
  return pseudoInverse(new Matrix(rows), n, m, ipvt, null);
}

/**
 * (JᵀW·J)⁻¹ straight from the SVD of a row-major m×n Jacobian whose row r is weighted by
 * rowWeight[r] (W = diag(rowWeight²)), as the joint fit needs (per-log AR(1) factors). The columns
 * are equilibrated first so parameters of very different size (m² and m) keep their digits.
 */
export function covarianceFromJacobian(
  J: Float64Array,
  m: number,
  n: number,
  rowWeight: Float64Array,
): CovarianceFromR {
  const scale = new Float64Array(n);
  for (let r = 0; r < m; r++)
    for (let j = 0; j < n; j++) scale[j] += (J[r * n + j] * rowWeight[r]) ** 2;
  for (let j = 0; j < n; j++) scale[j] = scale[j] > 0 ? Math.sqrt(scale[j]) : 1;
  const a = new Matrix(m, n);
  for (let r = 0; r < m; r++)
    for (let j = 0; j < n; j++) a.set(r, j, (J[r * n + j] * rowWeight[r]) / scale[j]);
  const identity = Int32Array.from({ length: n }, (_, j) => j);
  return pseudoInverse(a, n, m, identity, scale);
}

/** Pseudo-inverse of AᵀA from A's SVD; entry (a, b) goes to (perm[a], perm[b]), divided by colScale[a]·colScale[b]. */
function pseudoInverse(
  a: Matrix,
  n: number,
  m: number,
  perm: Int32Array,
  colScale: Float64Array | null,
): CovarianceFromR {
  const svd = new SingularValueDecomposition(a, {
    computeLeftSingularVectors: false,
    computeRightSingularVectors: true,
    autoTranspose: false,
  });
  const sigma = svd.diagonal;
  const V = svd.rightSingularVectors;
  // ml-matrix returns them in descending order; sort defensively with the vectors.
  const order = sigma.map((_, k) => k).sort((x, y) => sigma[y] - sigma[x]);
  const singularValues = new Float64Array(n);
  for (let k = 0; k < n; k++) singularValues[k] = Math.abs(sigma[order[k]]);
  const smax = n > 0 ? singularValues[0] : 0;
  const threshold = Math.max(m, n) * EPS * smax;
  let rank = 0;
  for (let k = 0; k < n; k++) if (singularValues[k] > threshold) rank++;

  const cov = new Float64Array(n * n);
  for (let x = 0; x < n; x++) {
    for (let y = 0; y < n; y++) {
      let s = 0;
      for (let t = 0; t < rank; t++) {
        const k = order[t];
        const inv = 1 / (singularValues[t] * singularValues[t]);
        s += V.get(x, k) * V.get(y, k) * inv;
      }
      cov[perm[x] * n + perm[y]] = colScale ? s / (colScale[x] * colScale[y]) : s;
    }
  }
  return { unscaledCovariance: cov, singularValues, rank };
}
