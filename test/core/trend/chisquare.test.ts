import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareSf } from '../../../server/core/trend/chisquare.js';
import { InputError } from '../../../server/core/errors.js';

// NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.4 (critical values of the
// chi-square distribution), lower critical values, 3 decimals: P(X > x) = alpha. [dof, alpha, x]
// From memory: the handbook page could not be opened when these were last checked; the closed
// forms below (dof 2, even dof) are the other references.
const NIST_3DP: [number, number, number][] = [
  [10, 0.9, 4.865],
  [10, 0.95, 3.94],
  [10, 0.999, 1.479],
  [30, 0.95, 18.493],
  [30, 0.999, 11.588],
  [100, 0.9, 82.358],
  [100, 0.95, 77.929],
  [100, 0.999, 61.918],
];

describe('chi-square distribution', () => {
  // A printed value x rounded to d decimals means the exact quantile lies within ±half a unit:
  // the tail probability at the two ends of that bracket must straddle the printed alpha.
  it.each(NIST_3DP.map((r) => [...r, 5e-4]))(
    'dof %d, tail %d: table value %d brackets the upper tail',
    (dof, alpha, x, half) => {
      expect(chiSquareSf(x - half, dof)).toBeGreaterThan(alpha);
      expect(chiSquareSf(x + half, dof)).toBeLessThan(alpha);
    },
  );

  it('dof 2 is the exponential: P(X > x) = exp(−x/2) (closed form), far into the tail', () => {
    for (const x of [1e-6, 0.3, 2, 7.5, 40, 200, 1000]) {
      expect(chiSquareSf(x, 2) / Math.exp(-x / 2) - 1).toBeCloseTo(0, 12);
    }
  });

  it('even dof is a Poisson sum: P(X > x) = Σ_{k<dof/2} e^{−x/2}(x/2)^k/k! (closed form)', () => {
    for (const dof of [4, 10, 36, 120, 400]) {
      for (const x of [0.5 * dof, dof, 1.3 * dof, 2 * dof]) {
        let term = Math.exp(-x / 2),
          sum = 0;
        for (let k = 0; k < dof / 2; k++) {
          sum += term;
          term *= x / 2 / (k + 1);
        }
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
