import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { medianInterval } from '../../../server/core/ingest/clean.js';
import { parseNumber } from '../../../server/core/ingest/numbers.js';

const DOT = 46,
  COMMA = 44;

describe('parseNumber', () => {
  // Reference: the engine's parseFloat (ECMAScript StringToNumber, correctly rounded).
  it('equals parseFloat on decimal strings', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        fc.integer({ min: 0, max: 17 }),
        (x, digits) => {
          for (const s of [
            String(x),
            x.toFixed(Math.min(digits, 20)),
            x.toExponential(Math.min(digits, 20)),
            x.toPrecision(Math.max(1, digits)),
          ]) {
            if (!/^[-+]?\d/.test(s)) continue;
            expect(parseNumber(s, 0, s.length, DOT)).toBe(parseFloat(s));
          }
        },
      ),
      { numRuns: 2000 },
    );
  });
  it('reads a decimal comma only when told, and refuses junk', () => {
    expect(parseNumber(' 1,25 ', 0, 6, COMMA)).toBe(1.25);
    expect(parseNumber('1,25', 0, 4, DOT)).toBeNaN();
    for (const s of ['', ' ', '-', '1.2.3', '12a', 'e5', '1e', 'NaN', 'Infinity', '.'])
      expect(parseNumber(s, 0, s.length, DOT)).toBeNaN();
    expect(parseNumber('x-0.5y', 1, 5, DOT)).toBe(-0.5);
    expect(parseNumber('+.5e1', 0, 5, DOT)).toBe(5);
  });
});

describe('medianInterval', () => {
  it('equals the median of the sorted intervals', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 60 }),
        (xs) => {
          const t = [...xs].sort((a, b) => a - b);
          const d = t
            .slice(1)
            .map((v, i) => v - t[i])
            .sort((a, b) => a - b);
          const m =
            d.length % 2 ? d[(d.length - 1) / 2] : (d[d.length / 2 - 1] + d[d.length / 2]) / 2;
          expect(medianInterval(Float64Array.from(t))).toBe(m);
        },
      ),
    );
  });
});
