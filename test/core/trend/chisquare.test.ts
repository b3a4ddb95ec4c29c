import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareSf } from '../../../server/core/trend/chisquare.js';
import { InputError } from '../../../server/core/errors.js';
// Reference library: @stdlib/stats-base-dists-chisquare-cdf (stdlib-js, maintained on npm).
import stdlibChiSquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';

// NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.4 (critical values of the
// chi-square distribution), lower critical values, 3 decimals: P(X > x) = alpha. [dof, alpha, x]
// From memory: the handbook page could not be opened when these were last checked; the stdlib
// comparison below is the primary reference.
const NIST_3DP: [number, number, number][] = [
  [10, 0.9, 4.865], [10, 0.95, 3.94], [10, 0.999, 1.479],
  [30, 0.95, 18.493], [30, 0.999, 11.588],
  [100, 0.9, 82.358], [100, 0.95, 77.929], [100, 0.999, 61.918],
];

describe('chi-square distribution', () => {
  // Against @stdlib/stats-base-dists-chisquare-cdf over a grid of dof and x from 0.1 % to 5× the
  // mean. Rounding in the series prefactor exp(a·ln(x/2) − x/2 − lnΓ(a+1)), a = dof/2, grows with
  // the size of that exponent, about a, so agreement is asked to 1e-14·max(1, a): relative on the
  // CDF, absolute on the upper tail (against 1 − stdlib's CDF). Values below 1e-300 are subnormal
  // or near it and carry too few digits to compare.
  const DOFS = [1, 2, 3, 4, 5, 7, 10, 17, 30, 60, 100, 250, 400, 1000];
  const FRACTIONS = [0.001, 0.01, 0.1, 0.3, 0.5, 0.8, 1, 1.2, 1.5, 2, 3, 5];
  it.each(DOFS)('dof %d: CDF and upper tail agree with stdlib', (dof) => {
    const tol = 1e-14 * Math.max(1, dof / 2);
    for (const f of FRACTIONS) {
      const x = f * dof;
      const ref = stdlibChiSquareCdf(x, dof);
      if (ref > 1e-300) expect(Math.abs(chiSquareCdf(x, dof) / ref - 1)).toBeLessThan(tol);
      expect(Math.abs(chiSquareSf(x, dof) - (1 - ref))).toBeLessThan(tol);
    }
  });

  // A printed value x rounded to d decimals means the exact quantile lies within ±half a unit:
  // the tail probability at the two ends of that bracket must straddle the printed alpha.
  it.each(NIST_3DP.map((r) => [...r, 5e-4]))(
    'dof %d, tail %d: table value %d brackets the upper tail', (dof, alpha, x, half) => {
      expect(chiSquareSf(x - half, dof)).toBeGreaterThan(alpha);
      expect(chiSquareSf(x + half, dof)).toBeLessThan(alpha);
    });

  it('dof 2 is the exponential: P(X > x) = exp(−x/2) (closed form), far into the tail', () => {
    for (const x of [1e-6, 0.3, 2, 7.5, 40, 200, 1000]) {
      expect(chiSquareSf(x, 2) / Math.exp(-x / 2) - 1).toBeCloseTo(0, 12);
    }
  });

  it('even dof is a Poisson sum: P(X > x) = Σ_{k<dof/2} e^{−x/2}(x/2)^k/k! (closed form)', () => {
    for (const dof of [4, 10, 36, 120, 400]) {
      for (const x of [0.5 * dof, dof, 1.3 * dof, 2 * dof]) {
        let term = Math.exp(-x / 2), sum = 0;
        for (let k = 0; k < dof / 2; k++) { sum += term; term *= x / 2 / (k + 1); }
        expect(chiSquareSf(x, dof) / sum - 1).toBeCloseTo(0, 10);
      }
    }
  });

  it('CDF and upper tail add to one and the CDF rises', () => {
    let prev = 0;
    for (let x = 0; x <= 60; x += 0.5) {
      const p = chiSquareCdf(x, 17);
      expect(p + chiSquareSf(x, 17)).toBeCloseTo(1, 14);
      expect(p).toBeGreaterThanOrEqual(prev);
      prev = p;
    }
    expect(chiSquareCdf(0, 3)).toBe(0);
  });

  it('refuses a dof that is not a whole number ≥ 1', () => {
    expect(() => chiSquareCdf(1, 0)).toThrow(InputError);
    expect(() => chiSquareSf(1, 2.5)).toThrow(InputError);
  });
});
