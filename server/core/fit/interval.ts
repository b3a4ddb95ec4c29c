/**
 * Intervals inside a parameter's valid range. Cd·a and Cd are positive: a symmetric interval
 * value ± k·u whose lower end reaches zero or below says nothing a positive quantity can be, so
 * it is replaced by the interval on the log scale, value·exp(±k·u/value) (first order: u/value
 * is the standard uncertainty of ln value, so the interval is log-normal in shape and always
 * positive; the usual treatment of a positive quantity, from memory). The profile interval,
 * where it was computed, is reported beside it.
 */
export function positiveInterval(
  value: number,
  u: number,
  k: number,
  symmetric: [number, number],
): { ci95: [number, number]; logScale: boolean } {
  if (!(symmetric[0] <= 0)) return { ci95: symmetric, logScale: false };
  // a value at (or below) zero has no log scale: the interval is cut at zero
  if (!(value > 0) || !(u > 0)) return { ci95: [0, Math.max(0, symmetric[1])], logScale: false };
  const r = (k * u) / value;
  return { ci95: [value * Math.exp(-r), value * Math.exp(r)], logScale: true };
}

/** True when the 95 % interval is wider than the value itself: the fit says little. */
export function intervalWiderThanValue(value: number, ci95: [number, number]): boolean {
  return !(ci95[1] - ci95[0] <= Math.abs(value));
}
