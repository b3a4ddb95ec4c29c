/**
 * Euclidean norm of x[offset .. offset+count-1] (stride 1) that neither overflows nor
 * underflows: the plain sum of squares is tried first (fast path for ordinary magnitudes)
 * and redone with scaling only when it left the safe range, as MINPACK's enorm intends.
 */
export function euclideanNorm(x: Float64Array, offset = 0, count = x.length - offset): number {
  let s = 0;
  const end = offset + count;
  for (let i = offset; i < end; i++) s += x[i] * x[i];
  if (s > 1e-280 && s < 1e280) return Math.sqrt(s);
  if (s === 0 || Number.isNaN(s)) return s;
  let big = 0;
  for (let i = offset; i < end; i++) {
    const a = Math.abs(x[i]);
    if (a > big) big = a;
  }
  if (big === 0 || !Number.isFinite(big)) return big;
  let t = 0;
  for (let i = offset; i < end; i++) {
    const q = x[i] / big;
    t += q * q;
  }
  return big * Math.sqrt(t);
}
