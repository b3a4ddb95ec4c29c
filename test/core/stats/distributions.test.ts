import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../../server/core/errors.js';
import { fCdf, tQuantile } from '../../../server/core/stats/index.js';

/** A printed 3-decimal table value v is matched when the exact value rounds to it. */
const printed3 = (x: number) => Number(x.toFixed(3));

describe('tQuantile', () => {
  it('matches NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2, upper critical values of t', () => {
    // Table rows as [ν, upper-tail α, t(1−α; ν)], printed to 3 decimals (values from memory).
    const table: Array<[number, number, number]> = [
      [1, 0.05, 6.314],
      [1, 0.025, 12.706],
      [2, 0.025, 4.303],
      [5, 0.01, 3.365],
      [5, 0.005, 4.032],
      [10, 0.05, 1.812],
      [10, 0.025, 2.228],
      [20, 0.025, 2.086],
      [30, 0.025, 2.042],
      [100, 0.025, 1.984],
      [100, 0.1, 1.29],
    ];
    for (const [dof, alpha, t] of table) expect(printed3(tQuantile(1 - alpha, dof))).toBe(t);
  });
  it('agrees with the closed forms for 1 and 2 degrees of freedom', () => {
    // ν = 1 is the Cauchy distribution: t_p = tan(π(p − ½)); ν = 2: t_p = (2p − 1)/sqrt(2p(1 − p)).
    // Both follow from integrating the t density by hand (ordinary calculus).
    fc.assert(
      fc.property(fc.double({ min: 0.001, max: 0.999, noNaN: true }), (p) => {
        const cauchy = Math.tan(Math.PI * (p - 0.5));
        const two = (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
        return (
          Math.abs(tQuantile(p, 1) - cauchy) <= 1e-9 * Math.max(1, Math.abs(cauchy)) &&
          Math.abs(tQuantile(p, 2) - two) <= 1e-9 * Math.max(1, Math.abs(two))
        );
      }),
    );
  });
  it('is symmetric about zero', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        fc.double({ min: 0.5, max: 1000, noNaN: true }),
        (p, v) =>
          Math.abs(tQuantile(p, v) + tQuantile(1 - p, v)) <=
          1e-9 * Math.max(1, Math.abs(tQuantile(p, v))),
      ),
    );
  });
  it('refuses probabilities outside (0, 1) and non-positive degrees of freedom', () => {
    for (const [p, v] of [
      [0, 5],
      [1, 5],
      [1.2, 5],
      [0.5, 0],
      [0.5, -3],
      [Number.NaN, 3],
    ]) {
      expect(() => tQuantile(p, v)).toThrow(InputError);
    }
  });
});

describe('fCdf', () => {
  it('matches NIST/SEMATECH e-Handbook §1.3.6.7.3, upper critical values of F', () => {
    // [α, ν1, ν2, F(1−α; ν1, ν2)] to 3 decimals (values from memory). The printed value rounds
    // the exact quantile, so the CDF must cross 1 − α within half a unit of the last decimal.
    const table: Array<[number, number, number, number]> = [
      [0.05, 1, 10, 4.965],
      [0.05, 5, 10, 3.326],
      [0.05, 2, 20, 3.493],
      [0.05, 10, 10, 2.978],
      [0.01, 1, 10, 10.044],
    ];
    for (const [alpha, d1, d2, f] of table) {
      expect(fCdf(f - 0.0005, d1, d2)).toBeLessThan(1 - alpha);
      expect(fCdf(f + 0.0005, d1, d2)).toBeGreaterThan(1 - alpha);
    }
  });
  it('F(1, ν) is the square of t(ν): P(F ≤ t²) = 2·P(T ≤ t) − 1', () => {
    for (const v of [3, 7.5, 40])
      expect(fCdf(tQuantile(0.975, v) ** 2, 1, v)).toBeCloseTo(0.95, 12);
  });
  it('is 0 at and below zero, and refuses bad degrees of freedom', () => {
    expect(fCdf(0, 3, 4)).toBe(0);
    expect(fCdf(-1, 3, 4)).toBe(0);
    expect(() => fCdf(1, 0, 4)).toThrow(InputError);
    expect(() => fCdf(Number.NaN, 2, 4)).toThrow(InputError);
  });
});
