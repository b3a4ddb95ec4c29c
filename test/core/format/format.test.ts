import { describe, expect, it } from 'vitest';
import {
  areaText,
  clipText,
  countText,
  daysText,
  decimalsForSignificant,
  displayUnit,
  durationText,
  fixedText,
  flowText,
  lengthText,
  LITRES_PER_US_GALLON,
  measurementText,
  METRES_PER_FOOT,
  METRES_PER_INCH,
  significantText,
  SQUARE_METRES_PER_SQUARE_INCH,
  toDisplay,
  uncertaintyText,
} from '../../../server/core/format/index.js';

describe('conversion factors (NIST SP 811, 2008, Appendix B.8)', () => {
  it('the inch and the foot are exact (1959 yard-and-pound agreement, B.8)', () => {
    expect(METRES_PER_INCH).toBe(0.0254);
    expect(METRES_PER_FOOT).toBe(0.3048);
    expect(12 * METRES_PER_INCH).toBeCloseTo(METRES_PER_FOOT, 15);
  });
  it('the square inch is 6.4516 × 10⁻⁴ m² (B.8, exact)', () => {
    expect(SQUARE_METRES_PER_SQUARE_INCH).toBeCloseTo(6.4516e-4, 18);
  });
  it('the US gallon is 231 in³ = 3.785 411 784 L (B.8 and its footnote)', () => {
    expect(LITRES_PER_US_GALLON).toBe(3.785411784);
    expect(231 * (METRES_PER_INCH * 10) ** 3).toBeCloseTo(LITRES_PER_US_GALLON, 12);
  });
  it('1 gal/min is 6.309 020 × 10⁻² L/s (B.8, gallon [U.S.] per minute → liter per second)', () => {
    // displayed flow per SI flow: 1 m³/s in gal/min
    const galPerMinPerM3s = toDisplay('flow', 1, 'us');
    expect(1000 / galPerMinPerM3s).toBeCloseTo(6.30902e-2, 7);
  });
  it('1 m = 3.280 84 ft, 1 m² = 1550.003 in² (B.8 reciprocals)', () => {
    expect(toDisplay('length', 1, 'us')).toBeCloseTo(3.28084, 5);
    expect(toDisplay('area', 1, 'us')).toBeCloseTo(1550.0031, 4);
  });
  it('SI display: mm², L/s, m, mm', () => {
    expect(displayUnit('area', 'si').symbol).toBe('mm²');
    expect(displayUnit('flow', 'si').symbol).toBe('L/s');
    expect(displayUnit('length', 'si').symbol).toBe('m');
    expect(displayUnit('area', 'us').symbol).toBe('in²');
    expect(displayUnit('flow', 'us').symbol).toBe('gal/min');
    expect(displayUnit('length', 'us').symbol).toBe('ft');
  });
});

describe('digits (JCGM 100:2008 §7.2.6: U to two significant digits, the value to match)', () => {
  it('rounds U to two significant digits and the value to the same place', () => {
    // worked by hand: U = 0.005541 → 0.0055 (4 decimals); 0.612045 → 0.6120 (zero kept)
    expect(measurementText(0.612045, 0.005541)).toBe('0.6120 ± 0.0055');
    // U = 0.0995 → 0.10 (two digits after rounding, so 2 decimals, not 0.100)
    expect(measurementText(1.23456, 0.0995)).toBe('1.23 ± 0.10');
    // U = 23.4 → 23; value 1062.4 → 1062
    expect(measurementText(1062.4, 23.4, 'mm²')).toBe('1062 ± 23 mm²');
    // U = 1234 → 1200: value rounded to hundreds
    expect(measurementText(56789, 1234)).toBe('56800 ± 1200');
  });
  it('keeps trailing zeros and writes no exponent for ordinary magnitudes', () => {
    expect(fixedText(0.5, 4)).toBe('0.5000');
    expect(significantText(0.61, 4)).toBe('0.6100');
    expect(significantText(0.000397637, 4)).toBe('0.0003976');
    expect(significantText(1201.748, 4)).toBe('1202');
    expect(significantText(2.5e-8, 2)).toBe('2.5e-8');
    expect(uncertaintyText(0.0804)).toBe('0.080');
  });
  it('decimals from the rounded value', () => {
    expect(decimalsForSignificant(0.0995, 2)).toBe(2);
    expect(decimalsForSignificant(0.094, 2)).toBe(3);
    expect(decimalsForSignificant(1000, 2)).toBe(-2);
  });
  it('without an uncertainty, six significant digits', () => {
    expect(measurementText(0.6120453, null)).toBe('0.612045');
  });
  it('no negative zero', () => {
    expect(fixedText(-0.00001, 2)).toBe('0.00');
  });
});

describe("quantities in the person's units", () => {
  it('Cd·a of 1.2017 × 10⁻³ m² with U = 1.58 × 10⁻⁷ m²', () => {
    expect(areaText(1.201748e-3, 1.5765e-7)).toBe('1201.75 ± 0.16 mm²');
    // 1.201748e-3 / 6.4516e-4 = 1.862712 in², U 2.4436e-4 in² → 0.00024
    expect(areaText(1.201748e-3, 1.5765e-7, 'us')).toBe('1.86271 ± 0.00024 in²');
  });
  it('flows in L/s or gal/min, lengths in m or ft', () => {
    expect(flowText(2.5e-3)).toBe('2.500 L/s');
    // 2.5 L/s / 0.0630902 = 39.626 gal/min
    expect(flowText(2.5e-3, undefined, 'us')).toBe('39.63 gal/min');
    expect(lengthText(3.048, undefined, 'us')).toBe('10.00 ft');
    expect(lengthText(3.2)).toBe('3.200 m');
  });
});

describe('durations and words', () => {
  it('over 90 days in months or years (issue 17 §3)', () => {
    expect(daysText(40)).toBe('40 days');
    expect(daysText(90)).toBe('90 days');
    expect(daysText(274)).toBe('9 months'); // 274 / 30.437 = 9.0
    expect(daysText(3386)).toBe('9.3 years'); // 3386 / 365.2425 = 9.27
    expect(durationText(45)).toBe('45 s');
    expect(durationText(1800)).toBe('30 min');
    expect(durationText(-86400 * 3)).toBe('−3 days');
    expect(daysText(1)).toBe('1 day');
  });
  it('counts and cuts', () => {
    expect(countText(1, 'warning')).toBe('1 warning');
    expect(countText(0, 'warning')).toBe('0 warnings');
    expect(clipText('Kestrel Fen water treatment works', 12)).toBe('Kestrel Fen…');
    expect(clipText('short', 12)).toBe('short');
  });
});
