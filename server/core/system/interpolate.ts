/** Linear interpolation in an ascending time series, held flat beyond its ends. */
export function interpolateLinear(ts: Float64Array, ys: Float64Array, t: number): number {
  const n = ts.length;
  if (t <= ts[0]) return ys[0];
  if (t >= ts[n - 1]) return ys[n - 1];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (ts[mid] <= t) lo = mid;
    else hi = mid;
  }
  return ys[lo] + ((ys[hi] - ys[lo]) * (t - ts[lo])) / (ts[hi] - ts[lo]);
}
