import { describe, expect, it } from 'vitest';
import { compareEn, expandedUncertaintyOfDifference } from '../../../server/core/compare/en.js';
import { comparisonLines, comparePairs } from '../../../server/core/compare/table.js';

// E_n = (x₁ − x₂) / √(U₁² + U₂²), |E_n| ≤ 1 satisfactory: ISO/IEC 17043:2010 Annex B (B.3.1.3),
// the form recalled from memory, not read from the standard's text here.
describe('E_n numbers', () => {
  it('a hand-worked example', () => {
    // x₁ = 0.612, U₁ = 0.006; x₂ = 0.598, U₂ = 0.008
    // difference 0.014; U_diff = √(0.000036 + 0.000064) = √0.0001 = 0.010; E_n = 1.4 → differ
    const c = compareEn(
      { value: 0.612, expandedUncertainty: 0.006 },
      { value: 0.598, expandedUncertainty: 0.008 },
    )!;
    expect(c.difference).toBeCloseTo(0.014, 12);
    expect(c.expandedUncertaintyOfDifference).toBeCloseTo(0.01, 12);
    expect(c.en).toBeCloseTo(1.4, 10);
    expect(c.agree).toBe(false);
  });
  it('U_diff combines the expanded (not the standard) uncertainties', () => {
    // Cd·a 1201.75 mm², U 3 mm² against 1196.75 mm², U 4 mm²: U_diff = 5 (3-4-5), E_n = 5/5 = 1.0 → agree
    // with the standard uncertainties (1.5 and 2, k = 2) the ratio would be 2.0: this checks which is used.
    expect(expandedUncertaintyOfDifference(3, 4)).toBe(5);
    const c = compareEn(
      { value: 1201.75, expandedUncertainty: 3 },
      { value: 1196.75, expandedUncertainty: 4 },
    )!;
    expect(c.en).toBeCloseTo(1.0, 12);
    expect(c.agree).toBe(true);
    const reversed = compareEn(
      { value: 1196.75, expandedUncertainty: 4 },
      { value: 1201.75, expandedUncertainty: 3 },
    )!;
    expect(reversed.en).toBeCloseTo(-1.0, 12);
    expect(reversed.agree).toBe(true);
  });
  it('no E_n without uncertainties', () => {
    expect(
      compareEn({ value: 1, expandedUncertainty: 0 }, { value: 2, expandedUncertainty: 0 }),
    ).toBeNull();
    expect(
      compareEn({ value: 1, expandedUncertainty: NaN }, { value: 2, expandedUncertainty: 1 }),
    ).toBeNull();
  });
  it('the table: every pair once, in order, with E_n to two decimals', () => {
    const fits = [
      {
        label: 'a',
        effectiveAreaM2: { value: 1.2e-3, expandedUncertainty: 3e-6 },
        dischargeCoefficient: null,
      },
      {
        label: 'b',
        effectiveAreaM2: { value: 1.195e-3, expandedUncertainty: 4e-6 },
        dischargeCoefficient: null,
      },
      { label: 'c', effectiveAreaM2: null, dischargeCoefficient: null },
    ];
    const pairs = comparePairs(fits);
    expect(pairs.map((p) => `${p.first}-${p.second}`)).toEqual(['a-b', 'a-c', 'b-c']);
    const text = comparisonLines(fits, 'si').join('\n');
    // 5 mm² difference, U_diff 5 mm² (3-4-5), E_n 1.00
    expect(text).toMatch(/a − b\s+5\.0 ± 5\.0\s+1\.00 \(agree\)/);
    expect(text).toContain('Comparison of 3 tests');
    expect(text).toContain('Cd·a ± U (mm²)');
    expect(comparisonLines(fits, 'us').join('\n')).toContain('Cd·a ± U (in²)');
  });
});
