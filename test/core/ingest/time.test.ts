import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

const read = (s: string, o = {}) => readLevelLog(new TextEncoder().encode(s), 'log.csv', o);
const log = (header: string, cells: string[], d = ',') =>
  [`${header}${d}Level (m)`, ...cells.map((c, i) => `${c}${d}${(2 - i / 100).toFixed(2)}`)].join(
    '\n',
  ) + '\n';
const codes = (xs: { code: string }[]) => xs.map((x) => x.code);
const refusal = (f: () => unknown): InputError => {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
};

// Reference instants come from ECMAScript's Date.UTC, independent of the reader's calendar code.
describe('timestamps', () => {
  it('reads ISO 8601 with Z and with ±hh:mm offsets', () => {
    const s = read(
      log('Timestamp', [
        '2026-05-04T08:00:00Z',
        '2026-05-04T10:00:01+02:00',
        '2026-05-04T03:00:02-05:00',
      ]),
    );
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 4, 8, 0, 0));
    expect(Array.from(s.timeS)).toEqual([0, 1, 2]);
    expect(s.notes.find((n) => n.code === 'time-zone')!.message).toMatch(
      /3 times carry their UTC offset/,
    );
  });
  it('reads "YYYY-MM-DD hh:mm:ss.fff" as UTC without --tz, and says so', () => {
    const s = read(
      log('Timestamp', [
        '2026-05-04 10:00:00.000',
        '2026-05-04 10:00:00.250',
        '2026-05-04 10:00:00.5',
      ]),
    );
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 4, 10, 0, 0));
    expect(Array.from(s.timeS)).toEqual([0, 0.25, 0.5]);
    expect(s.notes.find((n) => n.code === 'time-zone')!.message).toMatch(/treated as UTC/);
  });
  for (const sep of ['/', '.', '-']) {
    it(`reads day-first dates with "${sep}" when a day is above 12`, () => {
      const s = read(
        log('Date time', [`12${sep}05${sep}2026 23:59:59`, `13${sep}05${sep}2026 00:00:00`]),
      );
      expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 12, 23, 59, 59));
      expect(s.notes.find((n) => n.code === 'date-order')!.message).toMatch(/day-first/);
    });
  }
  it('reads month-first dates when a second number is above 12', () => {
    const s = read(log('Date time', ['05/12/2026 23:59:59', '05/13/2026 00:00:00']));
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 12, 23, 59, 59));
    expect(s.notes.find((n) => n.code === 'date-order')!.message).toMatch(/month-first/);
  });
  it('decides the order from the whole file, not only its first rows', () => {
    const cells = Array.from(
      { length: 300 },
      (_, i) =>
        `${i < 299 ? '12' : '13'}/05/2026 ${String(Math.floor(i / 60)).padStart(2, '0')}:${String(i % 60).padStart(2, '0')}:00`,
    );
    const s = read(log('Date time', cells));
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 12, 0, 0, 0));
    expect(s.notes.find((n) => n.code === 'date-order')!.message).toMatch(/day-first: line 301/);
  });
  it('refuses dates it cannot order, asking for --date-order, and follows it when given', () => {
    const text = log('Date time', ['04/05/2026 10:00:00', '04/05/2026 10:00:01']);
    expect(refusal(() => read(text)).message).toMatch(/--date-order/);
    expect(read(text, { dateOrder: 'mdy' }).t0EpochMs).toBe(Date.UTC(2026, 3, 5, 10, 0, 0));
    expect(read(text, { dateOrder: 'dmy' }).t0EpochMs).toBe(Date.UTC(2026, 4, 4, 10, 0, 0));
  });
  it('reads 12-hour clocks: 12 AM is midnight, 12 PM is noon', () => {
    const s = read(
      log('Date time', [
        '2026-05-04 12:00:00 AM',
        '2026-05-04 12:30:00 PM',
        '2026-05-04 1:00:00 pm',
      ]),
    );
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 4, 0, 0, 0));
    expect(Array.from(s.timeS)).toEqual([0, 12.5 * 3600, 13 * 3600]);
  });
  it('joins separate date and time columns', () => {
    const s = read('Date;Time;Level (m)\n13.05.2026;23:59:59;1,0\n14.05.2026;00:00:01;0,9\n');
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 4, 13, 23, 59, 59));
    expect(Array.from(s.timeS)).toEqual([0, 2]);
    expect(s.columns.map((c) => c.role)).toEqual(['date', 'clock', 'level']);
  });
  it('reads epoch seconds and milliseconds, decided by magnitude, and notes it', () => {
    const t = Date.UTC(2026, 4, 4, 10, 0, 0);
    const sec = read(log('epoch', [String(t / 1000), String(t / 1000 + 1)]));
    expect(sec.t0EpochMs).toBe(t);
    expect(sec.notes.some((n) => /epoch seconds/.test(n.message))).toBe(true);
    const ms = read(log('epoch', [String(t), String(t + 1500)]));
    expect(ms.t0EpochMs).toBe(t);
    expect(Array.from(ms.timeS)).toEqual([0, 1.5]);
    expect(ms.notes.some((n) => /epoch milliseconds/.test(n.message))).toBe(true);
  });
  it('reads elapsed seconds and minutes from the header unit', () => {
    const s = read(log('Elapsed (s)', ['0', '0.5', '1.0']));
    expect(s.t0EpochMs).toBeNull();
    expect(Array.from(s.timeS)).toEqual([0, 0.5, 1]);
    expect(Array.from(read(log('t [min]', ['1', '1.5', '2'])).timeS)).toEqual([0, 30, 60]);
  });
  it('reads spreadsheet serial day numbers in the 1900 date system, and says so', () => {
    // 1900 date system: serial 1 is 1900-01-01 and the system counts a 29 February 1900 that
    // never was, so later serials are days since 1899-12-30 (common practice).
    const base = Date.UTC(1899, 11, 30);
    const s = read(log('Timestamp', ['46146.5', '46146.50001157407']));
    expect(s.t0EpochMs).toBe(base + 46146.5 * 86_400_000);
    expect(s.timeS[1]).toBeCloseTo(1, 3);
    expect(s.notes.some((n) => /1900 date system/.test(n.message))).toBe(true);
  });
  it('takes fractional serial days under a bare "Time" header, but not whole seconds', () => {
    expect(read(log('Time', ['46146.5', '46146.50001157407'])).t0EpochMs).toBe(
      Date.UTC(1899, 11, 30) + 46146.5 * 86_400_000,
    );
    const secs = read(log('Time', ['30000', '30001']));
    expect(secs.t0EpochMs).toBeNull();
    expect(secs.warnings.map((w) => w.code)).toContain('time-unit-assumed');
  });
  it('rolls clock-only times over midnight', () => {
    const s = read(log('Time', ['23:59:58', '23:59:59', '00:00:00']));
    expect(Array.from(s.timeS)).toEqual([0, 1, 2]);
    expect(s.t0EpochMs).toBeNull();
  });
});

// EU summer time runs from 01:00 UTC on the last Sunday of March to 01:00 UTC on the last
// Sunday of October (Directive 2000/84/EC, arts. 2–3); in 2026 those are 29 March and 25 October.
describe('local times in a zone', () => {
  it('applies the zone offset in summer', () => {
    const s = read(log('Timestamp', ['2026-07-01 12:00:00', '2026-07-01 12:00:01']), {
      tz: 'Europe/Berlin',
    });
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 6, 1, 10, 0, 0));
  });
  it('resolves the repeated hour after clocks go back by row order', () => {
    const walls = [
      '01:45',
      '02:00',
      '02:15',
      '02:30',
      '02:45',
      '02:00',
      '02:15',
      '02:30',
      '02:45',
      '03:00',
    ].map((t) => `2026-10-25 ${t}:00`);
    const s = read(log('Timestamp', walls), { tz: 'Europe/Berlin' });
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 9, 24, 23, 45, 0));
    expect(Array.from(s.timeS)).toEqual(walls.map((_, i) => i * 900));
    expect(codes(s.warnings)).toContain('dst-repeated');
    expect(codes(s.warnings)).not.toContain('rows-sorted');
  });
  it('refuses a time in the hour skipped when clocks go forward, naming its line', () => {
    const e = refusal(() =>
      read(
        log('Timestamp', ['2026-03-29 01:45:00', '2026-03-29 02:15:00', '2026-03-29 03:15:00']),
        { tz: 'Europe/Berlin' },
      ),
    );
    expect(e.message).toMatch(/does not exist in Europe\/Berlin/);
    expect(e.line).toBe(3);
  });
  it('refuses an unknown zone', () => {
    expect(
      refusal(() =>
        read(log('Timestamp', ['2026-07-01 12:00:00', '2026-07-01 12:00:01']), {
          tz: 'Mars/Olympus',
        }),
      ).field,
    ).toBe('tz');
  });
});

describe('order, repeats and gaps', () => {
  it('drops duplicate rows and sorts out-of-order rows, with warnings', () => {
    const text =
      'Timestamp,Level (m)\n2026-05-04 10:00:00,2.0\n2026-05-04 10:00:02,1.8\n2026-05-04 10:00:01,1.9\n2026-05-04 10:00:02,1.8\n2026-05-04 10:00:03,1.7\n';
    const s = read(text);
    expect(Array.from(s.timeS)).toEqual([0, 1, 2, 3]);
    expect(Array.from(s.levelM)).toEqual([2, 1.9, 1.8, 1.7]);
    expect(Array.from(s.sourceLine)).toEqual([2, 4, 3, 6]);
    expect(codes(s.warnings)).toEqual(
      expect.arrayContaining(['rows-sorted', 'duplicates-dropped']),
    );
  });
  it('keeps the first of two rows with one time and different values, and warns', () => {
    const s = read(
      'Timestamp,Level (m)\n2026-05-04 10:00:00,2.0\n2026-05-04 10:00:00,1.9\n2026-05-04 10:00:01,1.8\n',
    );
    expect(Array.from(s.levelM)).toEqual([2, 1.8]);
    expect(codes(s.warnings)).toContain('conflicting-duplicates');
  });
  it('reports gaps longer than five median intervals', () => {
    const secs = [0, 1, 2, 3, 4, 5, 11, 12, 13];
    const s = read(log('Elapsed (s)', secs.map(String)));
    const gap = s.warnings.find((w) => w.code === 'gaps')!;
    expect(gap.message).toMatch(/1 gap longer than 5 median intervals.*5–11 s \(line 8\)/);
    const four = read(log('Elapsed (s)', [0, 1, 2, 3, 4, 5, 10, 11].map(String)));
    expect(codes(four.warnings)).not.toContain('gaps');
  });
});
