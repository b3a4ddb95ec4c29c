import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

const TEXT =
  'Time,Level [cm]\n2026-05-04T10:00:00Z,120.0\n2026-05-04T10:00:01Z,119.5\n2026-05-04T10:00:02Z,119.0\n';
const utf8 = (s: string) => new TextEncoder().encode(s);

function utf16(s: string, le: boolean, bom: boolean): Uint8Array {
  const out = new Uint8Array((s.length + (bom ? 1 : 0)) * 2);
  let at = 0;
  const put = (c: number) => {
    out[at++] = le ? c & 0xff : c >> 8;
    out[at++] = le ? c >> 8 : c & 0xff;
  };
  if (bom) put(0xfeff);
  for (let i = 0; i < s.length; i++) put(s.charCodeAt(i));
  return out;
}

const expectTest = (bytes: Uint8Array) => {
  const s = readLevelLog(bytes, 'log.csv');
  expect(Array.from(s.timeS)).toEqual([0, 1, 2]);
  expect(s.levelM[0]).toBeCloseTo(1.2, 12);
  return s;
};

describe('text encodings', () => {
  it('reads UTF-8 without a byte-order mark', () => {
    expect(expectTest(utf8(TEXT)).notes[0].message).toMatch(/utf-8/);
  });
  it('reads UTF-8 with a byte-order mark, keeping it out of the first header', () => {
    const s = expectTest(new Uint8Array([0xef, 0xbb, 0xbf, ...utf8(TEXT)]));
    expect(s.columns[0].header).toBe('Time');
    expect(s.columns[0].role).toBe('time');
  });
  it('reads UTF-16 little- and big-endian with a mark', () => {
    expect(expectTest(utf16(TEXT, true, true)).notes[0].message).toMatch(/utf-16le/);
    expect(expectTest(utf16(TEXT, false, true)).notes[0].message).toMatch(/utf-16be/);
  });
  it('detects UTF-16 without a mark from the NUL bytes', () => {
    expect(expectTest(utf16(TEXT, true, false)).notes[0].message).toMatch(/utf-16le.*NUL/);
    expect(expectTest(utf16(TEXT, false, false)).notes[0].message).toMatch(/utf-16be.*NUL/);
  });
  it('falls back to Latin-1 when UTF-8 is invalid, and says so', () => {
    // "Temp °C" with ° as the single byte 0xB0 (ISO 8859-1), which is invalid UTF-8.
    const text =
      'Time,Level [cm],Temp \u00b0C\n2026-05-04T10:00:00Z,120.0,12.5\n2026-05-04T10:00:01Z,119.5,12.5\n2026-05-04T10:00:02Z,119.0,12.5\n';
    const bytes = Uint8Array.from(text, (c) => c.charCodeAt(0));
    const s = expectTest(bytes);
    expect(s.columns[2].header).toBe('Temp \u00b0C');
    expect(s.columns[2].role).toBe('temperature');
    expect(s.warnings.map((w) => w.code)).toContain('encoding');
  });
  it('refuses NUL bytes in a UTF-8 file as binary, naming the line', () => {
    const bytes = utf8(TEXT);
    bytes[TEXT.indexOf('119.5')] = 0;
    const err = (() => {
      try {
        readLevelLog(bytes, 'log.csv');
      } catch (e) {
        return e;
      }
    })();
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).message).toMatch(/binary/);
    expect((err as InputError).line).toBe(3);
  });
  it('refuses control characters', () => {
    expect(() => readLevelLog(utf8(TEXT.replace('119.0', '119\u00070')), 'log.csv')).toThrow(
      /binary/,
    );
  });
  it('refuses random bytes of a binary file', () => {
    const bytes = new Uint8Array(2000);
    let x = 12345;
    for (let i = 0; i < bytes.length; i++) {
      x = (x * 1103515245 + 12345) >>> 0;
      bytes[i] = x >>> 24;
    }
    expect(() => readLevelLog(bytes, 'x.bin')).toThrow(InputError);
  });
});
