import { THETA } from '../drain/parameters.js';

/** Optional model terms a person can switch on. */
export interface ModelTerms {
  inflow: boolean;
  datum: boolean;
  exponent: boolean;
}

export function describeTerms(t: ModelTerms): string {
  const on = [t.inflow && 'inflow', t.datum && 'datum', t.exponent && 'exponent'].filter(Boolean);
  return on.length ? `Cd·a, initial level + ${on.join(' + ')}` : 'Cd·a, initial level';
}

/** Free θ indices for a set of terms, in θ order. */
export function freeIndices(t: ModelTerms): Int32Array {
  const list: number[] = [THETA.effectiveArea, THETA.initialReading];
  if (t.datum) list.push(THETA.sensorZero);
  if (t.inflow) list.push(THETA.inflow);
  if (t.exponent) list.push(THETA.exponent);
  return Int32Array.from(list);
}

/**
 * Bounds on θ: Cd·a ≥ 0; the exponent kept in [0.2, 0.95] (the closed form needs n < 1, and a
 * fitted value at either end is reported as at a bound); inflow may be negative (a second,
 * unmodelled leak) so it is unbounded.
 */
export function boundsFor(free: Int32Array): { lower: Float64Array; upper: Float64Array } {
  const lower = new Float64Array(free.length).fill(-Infinity);
  const upper = new Float64Array(free.length).fill(Infinity);
  free.forEach((j, c) => {
    if (j === THETA.effectiveArea) lower[c] = 0;
    if (j === THETA.exponent) {
      lower[c] = 0.2;
      upper[c] = 0.95;
    }
  });
  return { lower, upper };
}
