/**
 * Householder QR with column pivoting of a tall m×n matrix, after MINPACK's qrfac (Moré 1978).
 * Storage is column-major (a[j*m + i] = row i, column j) so that each Householder reflection
 * runs down contiguous memory; the cost is O(m·n²), nothing m×m is ever formed and nothing
 * is allocated: the caller owns every work array.
 *
 * On return the strict upper triangle of the first n rows holds R without its diagonal,
 * rdiag holds R's diagonal, and the columns at and below the diagonal hold the Householder
 * vectors v_j (scaled so that v_j[j] = 1 + |…|, as in qrfac). Column j of R belongs to the
 * original column ipvt[j].
 */
import { euclideanNorm } from './norm.js';

const EPS = 2.220446049250313e-16;

export interface QrWork {
  /** Pivot: R's column j is the input's column ipvt[j]. */
  ipvt: Int32Array;
  /** Diagonal of R. */
  rdiag: Float64Array;
  /** Norms of the input columns (before factorisation), in input order. */
  acnorm: Float64Array;
  /** Scratch of length ≥ n. */
  wa: Float64Array;
}

export function householderQr(a: Float64Array, m: number, n: number, pivot: boolean, w: QrWork): void {
  const { ipvt, rdiag, acnorm, wa } = w;
  for (let j = 0; j < n; j++) {
    acnorm[j] = euclideanNorm(a, j * m, m);
    rdiag[j] = acnorm[j];
    wa[j] = rdiag[j];
    ipvt[j] = j;
  }
  const minmn = Math.min(m, n);
  for (let j = 0; j < minmn; j++) {
    if (pivot) {
      // Bring the column of largest remaining norm into the pivot position.
      let kmax = j;
      for (let k = j; k < n; k++) if (rdiag[k] > rdiag[kmax]) kmax = k;
      if (kmax !== j) {
        const cj = j * m;
        const ck = kmax * m;
        for (let i = 0; i < m; i++) {
          const t = a[cj + i];
          a[cj + i] = a[ck + i];
          a[ck + i] = t;
        }
        rdiag[kmax] = rdiag[j];
        wa[kmax] = wa[j];
        const t = ipvt[j];
        ipvt[j] = ipvt[kmax];
        ipvt[kmax] = t;
      }
    }
    const cj = j * m;
    let ajnorm = euclideanNorm(a, cj + j, m - j);
    if (ajnorm !== 0) {
      if (a[cj + j] < 0) ajnorm = -ajnorm;
      for (let i = j; i < m; i++) a[cj + i] /= ajnorm;
      a[cj + j] += 1;
      const ajj = a[cj + j];
      for (let k = j + 1; k < n; k++) {
        const ck = k * m;
        let sum = 0;
        for (let i = j; i < m; i++) sum += a[cj + i] * a[ck + i];
        const t = sum / ajj;
        for (let i = j; i < m; i++) a[ck + i] -= t * a[cj + i];
        if (pivot && rdiag[k] !== 0) {
          // Downdate the remaining column norm; recompute it when cancellation has eaten it.
          const q = a[ck + j] / rdiag[k];
          rdiag[k] *= Math.sqrt(Math.max(0, 1 - q * q));
          const r = rdiag[k] / wa[k];
          if (0.05 * r * r <= EPS) {
            rdiag[k] = euclideanNorm(a, ck + j + 1, m - j - 1);
            wa[k] = rdiag[k];
          }
        }
      }
    }
    rdiag[j] = -ajnorm;
  }
}

/**
 * out[0..n-1] = first n entries of Qᵀ·b, using the reflections left in `a` by householderQr.
 * `scratch` (length m) receives the whole of Qᵀ·b; b is not modified.
 */
export function applyQt(a: Float64Array, m: number, n: number, b: Float64Array, scratch: Float64Array, out: Float64Array): void {
  scratch.set(b.subarray(0, m));
  const minmn = Math.min(m, n);
  for (let j = 0; j < minmn; j++) {
    const cj = j * m;
    const ajj = a[cj + j];
    if (ajj === 0) continue;
    let sum = 0;
    for (let i = j; i < m; i++) sum += a[cj + i] * scratch[i];
    const t = -sum / ajj;
    for (let i = j; i < m; i++) scratch[i] += t * a[cj + i];
  }
  for (let j = 0; j < n; j++) out[j] = j < m ? scratch[j] : 0;
}

/** Copy R (n×n, upper triangular, column-major with leading dimension n) out of the factored `a`. */
export function extractR(a: Float64Array, m: number, n: number, rdiag: Float64Array, R: Float64Array): void {
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      R[j * n + i] = i < j ? a[j * m + i] : i === j ? rdiag[j] : 0;
    }
  }
}
