import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isoZuluMs, newParts, scanDateTime, wallMs } from '../../../server/core/ingest/datetime.js';

/** The general path the reader takes for any time: scan, then the wall clock minus the offset. */
function generalMs(text: string): number {
  const p = newParts();
  if (!scanDateTime(text, 0, text.length, p) || !p.hasDate) return NaN;
  const wall = wallMs(p, 'ymd');
  return Number.isNaN(p.offsetMin) ? NaN : wall - p.offsetMin * 60_000;
}

describe('isoZuluMs, the fast path for YYYY-MM-DDThh:mm:ss[.fff]Z', () => {
  it('equals Date.parse and the general scanner on random instants of 1900–2200', () => {
    // Date.parse reads this form exactly (ECMAScript, Date Time String Format, via Node's Date)
    fc.assert(
      fc.property(
        fc.integer({ min: Date.UTC(1900, 0, 1), max: Date.UTC(2200, 11, 31, 23, 59, 59, 999) }),
        fc.boolean(),
        (t, withMs) => {
          const iso = new Date(withMs ? t : t - (((t % 1000) + 1000) % 1000)).toISOString();
          const text = withMs ? iso : iso.slice(0, 19) + 'Z';
          const fast = isoZuluMs(text, 0, text.length);
          expect(fast).toBe(Date.parse(text));
          expect(fast).toBe(generalMs(text));
        },
      ),
      { numRuns: 2000 },
    );
  });

  it('reads a field in the middle of a line', () => {
    const line = 'x,2026-04-02T06:00:00.100Z,3.5';
    expect(isoZuluMs(line, 2, 26)).toBe(Date.UTC(2026, 3, 2, 6, 0, 0, 100));
  });

  it('leaves every other form to the general scanner (NaN)', () => {
    for (const text of [
      '2026-04-02 06:00:00Z', // space, not T
      '2026-04-02T06:00:00z',
      '2026-04-02T06:00:00+00:00',
      '2026-04-02T06:00:00.1Z', // one fraction digit
      ' 2026-04-02T06:00:00Z',
      '2026-04-02T06:00:00',
      '2026/04/02T06:00:00Z',
      '2026-04-02T06:0a:00Z',
      '2026-04-02T06:00:00,000Z',
    ])
      expect(isoZuluMs(text, 0, text.length)).toBeNaN();
  });

  it('refuses what the general path refuses: impossible dates and clocks, years outside 1900–2200', () => {
    for (const text of [
      '2026-02-29T00:00:00Z',
      '2026-13-01T00:00:00Z',
      '2026-04-00T00:00:00Z',
      '2026-04-02T24:00:00Z',
      '2026-04-02T23:60:00Z',
      '2026-04-02T23:59:60Z',
      '1899-12-31T23:59:59Z',
      '2201-01-01T00:00:00Z',
    ]) {
      expect(isoZuluMs(text, 0, text.length)).toBeNaN();
      expect(generalMs(text)).toBeNaN();
    }
    // a leap day is a date (Gregorian rule, common practice)
    expect(isoZuluMs('2024-02-29T12:00:00Z', 0, 20)).toBe(Date.UTC(2024, 1, 29, 12));
    expect(isoZuluMs('2000-02-29T00:00:00Z', 0, 20)).toBe(generalMs('2000-02-29T00:00:00Z'));
    expect(isoZuluMs('1900-02-29T00:00:00Z', 0, 20)).toBeNaN();
  });
});
