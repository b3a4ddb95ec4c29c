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
export function covarianceFromR(R: Float64Array, n: number, ipvt: Int32Array, m: number): CovarianceFromR {
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    for (let j = 0; j < n; j++) row[j] = R[j * n + i];
    rows.push(row);
  }
  const svd = new SingularValueDecomposition(new Matrix(rows), {
    computeLeftSingularVectors: false,
    computeRightSingularVectors: true,
    autoTranspose: false,
  });
  const sigma = svd.diagonal;
  const V = svd.rightSingularVectors;
  // ml-matrix returns them in descending order; sort defensively with the vectors.
  const order = sigma.map((_, k) => k).sort((a, b) => sigma[b] - sigma[a]);
  const singularValues = new Float64Array(n);
  for (let k = 0; k < n; k++) singularValues[k] = Math.abs(sigma[order[k]]);
  const smax = n > 0 ? singularValues[0] : 0;
  const threshold = Math.max(m, n) * EPS * smax;
  let rank = 0;
  for (let k = 0; k < n; k++) if (singularValues[k] > threshold) rank++;

  const cov = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) {
      let s = 0;
      for (let t = 0; t < rank; t++) {
        const k = order[t];
        const inv = 1 / (singularValues[t] * singularValues[t]);
        s += V.get(a, k) * V.get(b, k) * inv;
      }
      cov[ipvt[a] * n + ipvt[b]] = s;
    }
  }
  return { unscaledCovariance: cov, singularValues, rank };
}
