import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { akaike, fCdf, nestedFTest } from '../../../server/core/stats/index.js';

describe('akaike', () => {
  it('with S = n the log term vanishes: AIC = 2K, K = k + 1 (by hand)', () => {
    const { aic, aicc } = akaike(20, 20, 2);
    expect(aic).toBe(6);
    // AICc = 6 + 2·3·4/(20 − 3 − 1) = 6 + 1.5.
    expect(aicc).toBe(7.5);
  });
  it('n·ln(S/n): halving S with n = 10 lowers AIC by 10·ln 2', () => {
    expect(akaike(5, 10, 3).aic - akaike(10, 10, 3).aic).toBeCloseTo(-10 * Math.LN2, 12);
  });
  it('AICc is infinite when too few points support the model', () => {
    expect(akaike(1, 4, 2).aicc).toBe(Infinity);
  });
  it('refuses impossible arguments', () => {
    for (const [s, n, k] of [
      [0, 10, 2],
      [-1, 10, 2],
      [1, 0, 2],
      [1, 10, -1],
      [1, 10.5, 2],
    ]) {
      expect(() => akaike(s, n, k)).toThrow(InputError);
    }
  });
});

describe('nestedFTest', () => {
  it('computes F = [(S_s − S_l)/(k_l − k_s)] / [S_l/(n − k_l)] (by hand)', () => {
    // (12 − 8)/1 over 8/(22 − 2) = 4/0.4 = 10, on (1, 20) degrees of freedom.
    const r = nestedFTest(12, 1, 8, 2, 22);
    expect(r.f).toBeCloseTo(10, 12);
    expect(r.dof1).toBe(1);
    expect(r.dof2).toBe(20);
    expect(r.pValue).toBeCloseTo(1 - fCdf(10, 1, 20), 15);
    // NIST/SEMATECH e-Handbook §1.3.6.7.3: F(0.99; 1, 20) = 8.096 (from memory), so p < 0.01.
    expect(r.pValue).toBeLessThan(0.01);
  });
  it('no improvement gives F = 0 and p = 1; a worse large model gives p = 1', () => {
    expect(nestedFTest(5, 2, 5, 3, 30)).toMatchObject({ f: 0, pValue: 1 });
    expect(nestedFTest(5, 2, 6, 3, 30).pValue).toBe(1);
  });
  it('a perfect large model is infinitely significant', () => {
    expect(nestedFTest(5, 2, 0, 3, 30)).toMatchObject({ f: Infinity, pValue: 0 });
  });
  it('refuses models that are not nested by count, or too few points', () => {
    expect(() => nestedFTest(5, 3, 4, 3, 30)).toThrow(InputError);
    expect(() => nestedFTest(5, 2, 4, 3, 3)).toThrow(InputError);
    expect(() => nestedFTest(-1, 2, 4, 3, 30)).toThrow(InputError);
  });
});
