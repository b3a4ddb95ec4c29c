import { describe, expect, it } from 'vitest';
import { parseWindowSetting } from '../../../server/core/analysis/window-setting.js';

const t0 = Date.UTC(2026, 5, 18, 13, 0, 0); // 2026-06-18 13:00 UTC = 14:00 in Lisbon (summer time, EU rule)

describe('a window stated by a person', () => {
  it('takes seconds from the log start', () => {
    expect(parseWindowSetting('120..900', t0)).toEqual({ startS: 120, endS: 900 });
  });
  it('reads timestamps with an offset as they say', () => {
    expect(parseWindowSetting('2026-06-18T13:02:00Z..2026-06-18T15:00:00+01:00', t0)).toEqual({
      startS: 120,
      endS: 3600,
    });
  });
  it('reads timestamps without an offset as local time in the zone given, like the log', () => {
    expect(
      parseWindowSetting('2026-06-18 14:02:00..2026-06-18 14:30:00', t0, 'Europe/Lisbon'),
    ).toEqual({ startS: 120, endS: 1800 });
  });
  it('reads them as UTC when no zone is given', () => {
    expect(parseWindowSetting('2026-06-18 13:02:00..2026-06-18 13:30:00', t0)).toEqual({
      startS: 120,
      endS: 1800,
    });
  });
  it('refuses a reversed window, a bad part and timestamps on an elapsed-time log', () => {
    expect(() => parseWindowSetting('900..120', t0)).toThrow(/ends before it starts/);
    expect(() => parseWindowSetting('soon..900', t0)).toThrow(/neither seconds/);
    expect(() => parseWindowSetting('2026-06-18T13:02:00Z..2026-06-18T13:30:00Z', null)).toThrow(
      /elapsed time/,
    );
  });
});
