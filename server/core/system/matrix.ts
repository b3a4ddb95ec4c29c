/**
 * Small dense linear algebra for n of a few to a few dozen (row-major Float64Array).
 * Gaussian elimination with partial pivoting; Cholesky for sampling from a covariance.
 */

/** Solve A·X = B for X (A n×n, B n×r), returning X; null when A is singular to working precision. */
export function solve(a: Float64Array, b: Float64Array, n: number, r: number): Float64Array | null {
  const m = Float64Array.from(a);
  const x = Float64Array.from(b);
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(m[i]));
  if (!(scale > 0)) return null;
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let i = col + 1; i < n; i++) if (Math.abs(m[i * n + col]) > Math.abs(m[piv * n + col])) piv = i;
    if (Math.abs(m[piv * n + col]) <= 1e-14 * scale) return null;
    if (piv !== col) {
      for (let j = 0; j < n; j++) [m[col * n + j], m[piv * n + j]] = [m[piv * n + j], m[col * n + j]];
      for (let j = 0; j < r; j++) [x[col * r + j], x[piv * r + j]] = [x[piv * r + j], x[col * r + j]];
    }
    const d = m[col * n + col];
    for (let i = col + 1; i < n; i++) {
      const f = m[i * n + col] / d;
      if (f === 0) continue;
      for (let j = col; j < n; j++) m[i * n + j] -= f * m[col * n + j];
      for (let j = 0; j < r; j++) x[i * r + j] -= f * x[col * r + j];
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    for (let j = 0; j < r; j++) {
      let s = x[i * r + j];
      for (let l = i + 1; l < n; l++) s -= m[i * n + l] * x[l * r + j];
      x[i * r + j] = s / m[i * n + i];
    }
  }
  return x;
}

export function identity(n: number): Float64Array {
  const e = new Float64Array(n * n);
  for (let i = 0; i < n; i++) e[i * n + i] = 1;
  return e;
}

/**
 * Inverse of a symmetric positive (semi)definite matrix after equilibrating its diagonal, so
 * parameters of very different size (m² and m) do not spoil the pivots; null when singular.
 */
export function inverseSymmetric(a: Float64Array, n: number): Float64Array | null {
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = a[i * n + i] > 0 ? 1 / Math.sqrt(a[i * n + i]) : 1;
  const s = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s[i * n + j] = a[i * n + j] * d[i] * d[j];
  const inv = solve(s, identity(n), n, n);
  if (!inv) return null;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) inv[i * n + j] *= d[i] * d[j];
  return inv;
}

/** Lower Cholesky factor L (L·Lᵀ = A) of a covariance; tiny negative pivots are clamped to 0. */
export function cholesky(a: Float64Array, n: number): Float64Array {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= l[i * n + k] * l[j * n + k];
      if (i === j) l[i * n + i] = Math.sqrt(Math.max(s, 0));
      else l[i * n + j] = l[j * n + j] > 0 ? s / l[j * n + j] : 0;
    }
  }
  return l;
}

/** G·Σ·Gᵀ for G (r×k) and Σ (k×k): the delta method's covariance of r derived quantities. */
export function propagate(g: Float64Array, sigma: Float64Array, r: number, k: number): Float64Array {
  const gs = new Float64Array(r * k);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += g[i * k + l] * sigma[l * k + j];
      gs[i * k + j] = s;
    }
  }
  const out = new Float64Array(r * r);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < r; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += gs[i * k + l] * g[j * k + l];
      out[i * r + j] = s;
    }
  }
  return out;
}
