/**
 * The engine's passes over all m rows, kept as small separate functions on purpose: the engine's
 * own body then has only O(n) work per iteration, and in a fresh process these few lines are
 * optimised by the JIT within the first pass, instead of waiting for the whole iteration (with
 * everything it would inline) to be compiled while the loops run unoptimised.
 */

/** Σ v_i². */
export function sumOfSquares(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return s;
}

/**
 * One pass over the rows of the row-major m×n J: colNormSq[j] = Σ J_ij², grad[j] = Σ J_ij·r_i
 * (both accumulated in row order).
 */
export function columnSumsOfSquaresAndGradient(
  J: Float64Array,
  r: Float64Array,
  m: number,
  n: number,
  colNormSq: Float64Array,
  grad: Float64Array,
): void {
  colNormSq.fill(0);
  grad.fill(0);
  if (n === 2) {
    let c0 = 0;
    let c1 = 0;
    let g0 = 0;
    let g1 = 0;
    for (let i = 0; i < m; i++) {
      const ri = r[i];
      const v0 = J[2 * i];
      const v1 = J[2 * i + 1];
      c0 += v0 * v0;
      c1 += v1 * v1;
      g0 += v0 * ri;
      g1 += v1 * ri;
    }
    colNormSq[0] = c0;
    colNormSq[1] = c1;
    grad[0] = g0;
    grad[1] = g1;
    return;
  }
  for (let i = 0; i < m; i++) {
    const row = i * n;
    const ri = r[i];
    for (let j = 0; j < n; j++) {
      const v = J[row + j];
      colNormSq[j] += v * v;
      grad[j] += v * ri;
    }
  }
}

/** a (column-major m×count) ← the columns cols[0..count−1] of the row-major m×n J. */
export function gatherColumns(
  J: Float64Array,
  m: number,
  n: number,
  cols: Int32Array | null,
  count: number,
  a: Float64Array,
): void {
  for (let k = 0; k < count; k++) {
    const j = cols ? cols[k] : k;
    const col = k * m;
    for (let i = 0; i < m; i++) a[col + i] = J[i * n + j];
  }
}
