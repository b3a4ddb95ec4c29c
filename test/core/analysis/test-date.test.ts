/** The stated test date's checks and the log's own date (core/analysis/test-date.ts). */
import { describe, expect, it } from 'vitest';
import { checkStatedTestDate, logTestDate } from '../../../server/core/analysis/test-date.js';
import { InputError } from '../../../server/core/errors.js';

const NOW = Date.parse('2026-06-01T12:00:00Z');

describe('a stated testedAt', () => {
  it('is ISO 8601 with a UTC offset, turned into UTC', () => {
    expect(checkStatedTestDate('2025-01-14T09:00:00+01:00', NOW)).toBe('2025-01-14T08:00:00.000Z');
    expect(checkStatedTestDate('2025-01-14T09:00Z', NOW)).toBe('2025-01-14T09:00:00.000Z');
    expect(checkStatedTestDate('2025-01-14', NOW)).toBe('2025-01-14T00:00:00.000Z'); // a date alone: midnight UTC
  });

  it('is refused naming the field when it is not a date, has no offset, is in the future or before 1990', () => {
    const cases: [string, RegExp][] = [
      ['14.01.2025', /not an ISO 8601/],
      ['2025-01-14T09:00', /add the UTC offset/],
      ['2025-02-29', /not a calendar date/], // 2025 is not a leap year
      ['2025-01-14T24:30Z', /not a time of day/],
      ['2026-06-01T12:06:00Z', /in the future/], // six minutes ahead: beyond the 5-minute skew
      ['1989-12-31T23:59:59Z', /before 1990/],
    ];
    for (const [text, why] of cases) {
      let err: unknown;
      try {
        checkStatedTestDate(text, NOW);
      } catch (e) {
        err = e;
      }
      expect(err, text).toBeInstanceOf(InputError);
      expect((err as InputError).field, text).toBe('testedAt');
      expect((err as InputError).message, text).toMatch(why);
    }
    expect(checkStatedTestDate('2026-06-01T12:04:00Z', NOW)).toBe('2026-06-01T12:04:00.000Z'); // within the skew
    expect(checkStatedTestDate('2024-02-29', NOW)).toBe('2024-02-29T00:00:00.000Z'); // a leap day
  });
});

describe("the log's own date", () => {
  it("is the window's first reading on the log's clock, else a preamble start plus the window offset", () => {
    expect(logTestDate({ startS: 40, startTime: '2026-03-10T08:15:40.000Z' }, [])).toBe(
      '2026-03-10T08:15:40.000Z',
    );
    const meta = [
      { key: 'Vessel', value: 'FD-1' },
      { key: 'Started', value: '2024-10-07T08:00:00Z' },
    ];
    expect(logTestDate({ startS: 70, startTime: null }, meta)).toBe('2024-10-07T08:01:10.000Z'); // 08:00:00 + 70 s, by hand
    expect(
      logTestDate({ startS: 0, startTime: null }, [
        { key: 'Start time', value: '2024-10-07 10:00:00+02:00' },
      ]),
    ).toBe('2024-10-07T08:00:00.000Z');
    // no offset, no clock: no date
    expect(
      logTestDate({ startS: 0, startTime: null }, [{ key: 'Started', value: '2024-10-07 08:00' }]),
    ).toBeNull();
    expect(logTestDate({ startS: 0, startTime: null }, null)).toBeNull();
  });
});
