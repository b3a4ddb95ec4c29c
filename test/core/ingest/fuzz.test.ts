import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import type { ReadOptions } from '../../../server/core/ingest/options.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';
import type { LevelSeries } from '../../../server/core/ingest/series.js';

const enc = (s: string) => new TextEncoder().encode(s);

// Invented layouts, one per family the reader supports.
const SEEDS: [string, ReadOptions][] = [
  [
    'Timestamp,Level [cm]\n2026-05-04T10:00:00Z,120.5\n2026-05-04T10:00:01Z,120.1\n2026-05-04T10:00:02Z,119.8\n2026-05-04T10:00:03Z,119.2\n',
    {},
  ],
  [
    'Site: A\nSerial: 9\n\nDate time;Level (m);Temp °C\n13.05.2026 10:00:00;1,20;12,1\n13.05.2026 10:00:01;1,19;12,1\n13.05.2026 10:00:02;1,18;12,2\n',
    {},
  ],
  ['Elapsed (s)\tlevel_mm\n0\t1000\n0.5\t990\n1.0\t981\n1.5\t973\n', {}],
  [
    'Date,Time,Pressure (psi)\n05/13/2026,11:59:58 PM,5.0\n05/13/2026,11:59:59 PM,4.9\n05/14/2026,12:00:00 AM,4.8\n',
    {},
  ],
  [
    'epoch_ms|Distance to surface (m)\n1778000000000|0.50\n1778000000500|0.52\n1778000001000|0.54\n',
    { mountElevationM: 3 },
  ],
  [
    '"Stamp","Level, side A (ft)"\n"2026-05-04 10:00:00","3.5"\n"2026-05-04 10:00:10","3.4"\n"2026-05-04 10:00:20","3.3"\n',
    { tz: 'America/Chicago' },
  ],
  [
    'Timestamp,Level\n2026-10-25 02:30:00,1\n2026-10-25 02:45:00,2\n2026-10-25 02:15:00,3\n2026-10-25 03:00:00,4\n',
    { unit: 'cm', tz: 'Europe/Berlin' },
  ],
];

function checkSeries(s: LevelSeries): void {
  const n = s.timeS.length;
  expect(n).toBeGreaterThanOrEqual(2);
  expect(s.levelM.length).toBe(n);
  expect(s.sourceLine.length).toBe(n);
  if (s.temperatureC) expect(s.temperatureC.length).toBe(n);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(s.timeS[i]) || !Number.isFinite(s.levelM[i]))
      throw new Error(`non-finite value at ${i}`);
    if (s.temperatureC && !Number.isFinite(s.temperatureC[i]))
      throw new Error(`non-finite temperature at ${i}`);
    if (i > 0 && !(s.timeS[i] > s.timeS[i - 1])) throw new Error(`time not ascending at ${i}`);
  }
  expect(s.timeS[0]).toBe(0);
}

/** readLevelLog returns a valid series or refuses with InputError; anything else fails. */
function readsOrRefuses(bytes: Uint8Array, opts: ReadOptions): void {
  let s: LevelSeries;
  try {
    s = readLevelLog(bytes, 'fuzz.csv', opts);
  } catch (e) {
    if (e instanceof InputError) {
      expect(e.message.length).toBeGreaterThan(0);
      expect(e.message).not.toMatch(/\n/);
      return;
    }
    throw e;
  }
  checkSeries(s);
}

describe('fuzz: every input reads or is refused with InputError', () => {
  it('seeds are valid logs', () => {
    for (const [text, opts] of SEEDS) checkSeries(readLevelLog(enc(text), 'seed.csv', opts));
  });
  it('random bytes', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 400 }), (b) => readsOrRefuses(b, {})),
      { numRuns: 400 },
    );
  });
  it('random printable text', () => {
    const cell = fc.stringMatching(/^[0-9:.,;\t| \-/TZ+aAmMpP"]{0,12}$/);
    const line = fc.array(cell, { maxLength: 5 }).map((c) => c.join(','));
    fc.assert(
      fc.property(fc.array(line, { maxLength: 12 }), (ls) =>
        readsOrRefuses(enc(`Time,Level (m)\n${ls.join('\n')}`), {}),
      ),
      { numRuns: 400 },
    );
  });
  const seed = fc.integer({ min: 0, max: SEEDS.length - 1 });
  it('truncated valid files', () => {
    fc.assert(
      fc.property(seed, fc.nat(), (k, cut) => {
        const b = enc(SEEDS[k][0]);
        readsOrRefuses(b.subarray(0, cut % (b.length + 1)), SEEDS[k][1]);
      }),
      { numRuns: 400 },
    );
  });
  it('valid files with bytes inserted or overwritten', () => {
    const edit = fc.record({
      at: fc.nat(),
      byte: fc.integer({ min: 0, max: 255 }),
      insert: fc.boolean(),
    });
    fc.assert(
      fc.property(seed, fc.array(edit, { minLength: 1, maxLength: 6 }), (k, edits) => {
        let b = Array.from(enc(SEEDS[k][0]));
        for (const e of edits) {
          const at = e.at % (b.length + 1);
          if (e.insert) b = [...b.slice(0, at), e.byte, ...b.slice(at)];
          else if (at < b.length) b[at] = e.byte;
        }
        readsOrRefuses(Uint8Array.from(b), SEEDS[k][1]);
      }),
      { numRuns: 600 },
    );
  });
  it('a quoted header cell holding a newline is named on one line (a case fast-check found)', () => {
    let b = Array.from(enc(SEEDS[5][0]));
    for (const e of [
      { at: 645636085, byte: 35, insert: false },
      { at: 0, byte: 32, insert: true },
      { at: 1607119278, byte: 35, insert: false },
    ]) {
      const at = e.at % (b.length + 1);
      if (e.insert) b = [...b.slice(0, at), e.byte, ...b.slice(at)];
      else if (at < b.length) b[at] = e.byte;
    }
    readsOrRefuses(Uint8Array.from(b), SEEDS[5][1]);
  });
  it('valid files with delimiters, digits and line ends swapped', () => {
    const swaps: [string, string][] = [
      [',', ';'],
      [';', ','],
      ['\t', ','],
      [',', '\t'],
      ['|', ';'],
      ['.', ','],
      ['\n', '\r\n'],
      ['\n', '\r'],
      [':', '.'],
      ['-', '/'],
      ['1', '7'],
    ];
    fc.assert(
      fc.property(
        seed,
        fc.subarray(swaps, { minLength: 1 }),
        fc.option(fc.nat()),
        (k, sw, only) => {
          let text = SEEDS[k][0];
          for (const [a, b] of sw) {
            if (only === null) text = text.split(a).join(b);
            else {
              const i = text.indexOf(a, only % (text.length + 1));
              if (i >= 0) text = text.slice(0, i) + b + text.slice(i + a.length);
            }
          }
          readsOrRefuses(enc(text), SEEDS[k][1]);
        },
      ),
      { numRuns: 600 },
    );
  });
});
