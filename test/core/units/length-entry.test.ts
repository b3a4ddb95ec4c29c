import { describe, expect, it } from 'vitest';
import { formatLengthEntry, parseLengthEntry } from '../../../server/core/units/index.js';

// Exact factors: 1 in = 0.0254 m, 1 ft = 0.3048 m (NIST SP 811, 2008, Appendix B.8), so each
// expected value below is the hand-worked product, written out.
describe('lengths as typed in a form', () => {
  it('reads feet and inches together, in the usual spellings', () => {
    expect(parseLengthEntry('7 ft 6 in', 'm')).toBe(2.286); // 90 in × 0.0254
    expect(parseLengthEntry('7\' 6"', 'm')).toBe(2.286);
    expect(parseLengthEntry('7ft6in', 'm')).toBe(2.286);
    expect(parseLengthEntry('6 ft', 'm')).toBe(1.8288); // 72 in
    expect(parseLengthEntry('15 feet 0 inches', 'm')).toBe(4.572); // 180 in
    expect(parseLengthEntry('0 ft 1.5 in', 'm')).toBe(0.0381);
    expect(parseLengthEntry('-1 ft 6 in', 'm')).toBe(-0.4572);
  });

  it('reads a bare number in the unit chosen beside the field, and a number with its own unit', () => {
    expect(parseLengthEntry('1.8', 'm')).toBe(1.8);
    expect(parseLengthEntry('450', 'mm')).toBe(0.45);
    expect(parseLengthEntry('25,4', 'mm')).toBe(0.0254);
    expect(parseLengthEntry('3', 'in')).toBe(0.0762);
    expect(parseLengthEntry('6', 'ft')).toBe(1.8288);
    expect(parseLengthEntry('6', 'ft-in')).toBe(1.8288);
    expect(parseLengthEntry('180 cm', 'ft')).toBe(1.8);
    expect(parseLengthEntry('0.004 in', 'm')).toBe(0.0001016);
    expect(parseLengthEntry('  ', 'm')).toBeNull();
  });

  it('refuses what is not a length, saying what was expected', () => {
    expect(() => parseLengthEntry('7 ft 13 in', 'm')).toThrow('from 0 to under 12');
    expect(() => parseLengthEntry('2 furlongs', 'm')).toThrow('"furlongs" is not a length unit');
    expect(() => parseLengthEntry('about two', 'm')).toThrow('cannot read "about two" as a length');
  });

  it('writes metres back in the chosen unit without binary noise', () => {
    expect(formatLengthEntry(2.286, 'ft-in')).toBe('7 ft 6 in');
    expect(formatLengthEntry(1.8288, 'ft-in')).toBe('6 ft');
    expect(formatLengthEntry(2.286, 'in')).toBe('90');
    expect(formatLengthEntry(0.0254, 'mm')).toBe('25.4');
    expect(formatLengthEntry(4.572, 'ft')).toBe('15');
    expect(formatLengthEntry(0.0001016, 'in')).toBe('0.004');
    // every unit round-trips
    for (const u of ['m', 'cm', 'mm', 'ft', 'in', 'ft-in'] as const)
      for (const m of [1.8, 0.025, 4.5, 0.0001, 2.286])
        expect(parseLengthEntry(formatLengthEntry(m, u), u)).toBe(m);
  });
});
