import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareSf } from '../../../server/core/trend/chisquare.js';
import { InputError } from '../../../server/core/errors.js';

// Upper-tail critical values x with P(X > x) = alpha, 5 decimals: the common 13-column
// "right tail areas for the chi-square distribution" table (as published at
// scribd.com/document/94112181 "Chi-Square Table"; rows 1–9 read and cross-read against the
// same table in a published exam-paper appendix). [dof, alpha, x]
const TABLE_5DP: [number, number, number][] = [
  [1, 0.5, 0.45494], [1, 0.1, 2.70554], [1, 0.05, 3.84146], [1, 0.01, 6.6349], [1, 0.005, 7.87944],
  [2, 0.95, 0.10259], [2, 0.5, 1.38629], [2, 0.05, 5.99146], [2, 0.01, 9.21034], [2, 0.005, 10.59663],
  [3, 0.995, 0.07172], [3, 0.5, 2.36597], [3, 0.05, 7.81473], [3, 0.01, 11.34487], [3, 0.005, 12.83816],
  [4, 0.9, 1.06362], [4, 0.25, 5.38527], [4, 0.05, 9.48773],
  [5, 0.995, 0.41174], [5, 0.1, 9.23636],
  [6, 0.995, 0.67573], [6, 0.25, 7.8408],
  [7, 0.995, 0.98926], [7, 0.25, 9.03715],
  [8, 0.5, 7.34412], [9, 0.5, 8.34283],
];
// NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.4 (critical values of the
// chi-square distribution), lower critical values, 3 decimals: P(X > x) = alpha. [dof, alpha, x]
const NIST_3DP: [number, number, number][] = [
  [10, 0.9, 4.865], [10, 0.95, 3.94], [10, 0.999, 1.479],
  [30, 0.95, 18.493], [30, 0.999, 11.588],
  [100, 0.9, 82.358], [100, 0.95, 77.929], [100, 0.999, 61.918],
];

describe('chi-square distribution', () => {
  // A printed value x rounded to d decimals means the exact quantile lies within ±half a unit:
  // the tail probability at the two ends of that bracket must straddle the printed alpha.
  it.each([...TABLE_5DP.map((r) => [...r, 5e-6]), ...NIST_3DP.map((r) => [...r, 5e-4])])(
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
