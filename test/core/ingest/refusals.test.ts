import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

const enc = (s: string) => new TextEncoder().encode(s);
const refusal = (s: string | Uint8Array, o = {}): InputError => {
  try {
    readLevelLog(typeof s === 'string' ? enc(s) : s, 'log.csv', o);
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
};
const rows = (n: number, cell = (i: number) => (3 - i / 1000).toFixed(3)) =>
  Array.from({ length: n }, (_, i) => `${i},${cell(i)}`).join('\n');

describe('bad input is refused with a one-line reason', () => {
  it('empty file', () => {
    expect(refusal(new Uint8Array(0)).message).toBe('empty file');
    expect(refusal('  \n\n ').message).toMatch(/no text/);
  });
  it('header only', () => {
    const e = refusal('Elapsed (s),Level (m)\n');
    expect(e.message).toMatch(/header but no data/);
    expect(e.line).toBe(1);
  });
  it('no numeric level column', () => {
    expect(refusal('Elapsed (s),Status\n0,open\n1,open\n2,open\n').message).toMatch(
      /no numeric level/,
    );
  });
  it('a level column of text', () => {
    expect(
      refusal('Elapsed (s),Level (m)\n0,high\n1,high\n2,low\n', { levelColumn: 2 }).message,
    ).toMatch(/does not hold numbers/);
  });
  it('a single data row', () => {
    const e = refusal('Elapsed (s),Level (m)\n0,1.5\n');
    expect(e.message).toMatch(/only one data row/);
    expect(e.line).toBe(2);
  });
  it('a file over the size limit', () => {
    expect(refusal(`Elapsed (s),Level (m)\n${rows(10)}\n`, { maxBytes: 50 }).message).toMatch(
      /more than the 50 allowed/,
    );
  });
  it('no time column', () => {
    expect(refusal('Level (m),Temp (C)\n1.0,12\n0.9,12\n').message).toMatch(/--time-column/);
  });
});

describe('unreadable cells', () => {
  it('skips a few blank or non-numeric level cells with a warning naming the lines', () => {
    const text = `Elapsed (s),Level (m)\n${rows(300, (i) => (i === 10 ? '' : i === 20 ? 'ERR' : (3 - i / 1000).toFixed(3)))}\n`;
    const s = readLevelLog(enc(text), 'log.csv');
    expect(s.timeS.length).toBe(298);
    const w = s.warnings.find((x) => x.code === 'rows-skipped')!;
    expect(w.message).toMatch(/2 rows with unreadable cells.*line 12, 22/);
  });
  it('refuses beyond 1 % of rows, naming the first bad line and column', () => {
    const text = `Elapsed (s),Level (m)\n${rows(100, (i) => (i % 20 === 5 ? 'n/a' : '1.0'))}\n`;
    const e = refusal(text);
    expect(e.line).toBe(7);
    expect(e.field).toBe('Level (m)');
    expect(e.message).toMatch(/not a number \(cell "n\/a"\)/);
  });
  it('skips a truncated last row', () => {
    const s = readLevelLog(enc(`Elapsed (s),Level (m)\n${rows(200)}\n200`), 'log.csv');
    expect(s.timeS.length).toBe(200);
    expect(s.warnings.map((w) => w.code)).toContain('rows-skipped');
  });
});
