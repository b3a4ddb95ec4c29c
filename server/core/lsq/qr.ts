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

/** sqrt(s) when s, a plain sum of squares, is in the range where euclideanNorm takes it as is; else NaN. */
function plainNorm(s: number): number {
  return s > 1e-280 && s < 1e280 ? Math.sqrt(s) : s === 0 ? 0 : NaN;
}

export function householderQr(
  a: Float64Array,
  m: number,
  n: number,
  pivot: boolean,
  w: QrWork,
): void {
  const { ipvt, rdiag, acnorm, wa } = w;
  for (let j = 0; j < n; j++) {
    acnorm[j] = euclideanNorm(a, j * m, m);
    rdiag[j] = acnorm[j];
    wa[j] = rdiag[j];
    ipvt[j] = j;
  }
  // The loops below fuse passes over m without changing a single rounding: each sum is still
  // accumulated in the same order as the separate loops (and euclideanNorm's plain path) would.
  // tail[k]: ‖a_k[j..m−1]‖ of column k as left by the previous step's update (NaN: recompute).
  const tail = w.wa.length >= 2 * n ? w.wa.subarray(n, 2 * n) : new Float64Array(n);
  for (let k = 0; k < n; k++) tail[k] = acnorm[k];
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
        const tt = tail[j];
        tail[j] = tail[kmax];
        tail[kmax] = tt;
        const t = ipvt[j];
        ipvt[j] = ipvt[kmax];
        ipvt[kmax] = t;
      }
    }
    const cj = j * m;
    let ajnorm = Number.isNaN(tail[j]) ? euclideanNorm(a, cj + j, m - j) : tail[j];
    if (ajnorm !== 0) {
      if (a[cj + j] < 0) ajnorm = -ajnorm;
      // scale v_j, and take v_j·a_{j+1} in the same pass (diagonal term first, as before)
      const k1 = j + 1 < n ? (j + 1) * m : -1;
      a[cj + j] /= ajnorm;
      a[cj + j] += 1;
      const ajj = a[cj + j];
      let sum1 = k1 >= 0 ? a[cj + j] * a[k1 + j] : 0;
      if (k1 >= 0) {
        for (let i = j + 1; i < m; i++) {
          const v = a[cj + i] / ajnorm;
          a[cj + i] = v;
          sum1 += v * a[k1 + i];
        }
      } else {
        for (let i = j + 1; i < m; i++) a[cj + i] /= ajnorm;
      }
      for (let k = j + 1; k < n; k++) {
        const ck = k * m;
        let sum = sum1;
        if (k !== j + 1) {
          sum = 0;
          for (let i = j; i < m; i++) sum += a[cj + i] * a[ck + i];
        }
        const t = sum / ajj;
        // update a_k, and accumulate ‖a_k[j+1..]‖² for the next step in the same pass
        a[ck + j] -= t * a[cj + j];
        let ss = 0;
        for (let i = j + 1; i < m; i++) {
          const v = a[ck + i] - t * a[cj + i];
          a[ck + i] = v;
          ss += v * v;
        }
        tail[k] = plainNorm(ss);
        if (pivot && rdiag[k] !== 0) {
          // Downdate the remaining column norm; recompute it when cancellation has eaten it.
          const q = a[ck + j] / rdiag[k];
          rdiag[k] *= Math.sqrt(Math.max(0, 1 - q * q));
          const r = rdiag[k] / wa[k];
          if (0.05 * r * r <= EPS) {
            rdiag[k] = Number.isNaN(tail[k]) ? euclideanNorm(a, ck + j + 1, m - j - 1) : tail[k];
            wa[k] = rdiag[k];
          }
        }
      }
    } else {
      for (let k = j + 1; k < n; k++) tail[k] = NaN;
    }
    rdiag[j] = -ajnorm;
  }
}

/**
 * out[0..n-1] = first n entries of Qᵀ·b, using the reflections left in `a` by householderQr.
 * `scratch` (length m) receives the whole of Qᵀ·b; b is not modified.
 */
export function applyQt(
  a: Float64Array,
  m: number,
  n: number,
  b: Float64Array,
  scratch: Float64Array,
  out: Float64Array,
): void {
  const minmn = Math.min(m, n);
  // The copy and each reflection are fused with the next reflection's dot product; every sum is
  // accumulated in the same order as separate passes would, so the result is the same to the bit.
  let j = 0;
  while (j < minmn && a[j * m + j] === 0) j++;
  let sum = 0;
  if (j < minmn) {
    const cj = j * m;
    for (let i = 0; i < j; i++) scratch[i] = b[i];
    for (let i = j; i < m; i++) {
      const v = b[i];
      scratch[i] = v;
      sum += a[cj + i] * v;
    }
  } else {
    scratch.set(b.subarray(0, m));
  }
  while (j < minmn) {
    const cj = j * m;
    const t = -sum / a[cj + j];
    let next = j + 1;
    while (next < minmn && a[next * m + next] === 0) next++;
    sum = 0;
    if (next < minmn) {
      const cn = next * m;
      for (let i = j; i < m; i++) {
        const v = scratch[i] + t * a[cj + i];
        scratch[i] = v;
        if (i >= next) sum += a[cn + i] * v;
      }
    } else {
      for (let i = j; i < m; i++) scratch[i] += t * a[cj + i];
    }
    j = next;
  }
  for (let k = 0; k < n; k++) out[k] = k < m ? scratch[k] : 0;
}

/** Copy R (n×n, upper triangular, column-major with leading dimension n) out of the factored `a`. */
export function extractR(
  a: Float64Array,
  m: number,
  n: number,
  rdiag: Float64Array,
  R: Float64Array,
): void {
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      R[j * n + i] = i < j ? a[j * m + i] : i === j ? rdiag[j] : 0;
    }
  }
}
