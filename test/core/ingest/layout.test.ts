import { describe, expect, it } from 'vitest';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

const read = (s: string, o = {}) => readLevelLog(new TextEncoder().encode(s), 'log.txt', o);
const rows = ['2026-05-04 10:00:00', '2026-05-04 10:00:10', '2026-05-04 10:00:20'];

describe('delimiters, decimal mark, preamble and header', () => {
  for (const [name, d] of [
    ['comma', ','],
    ['semicolon', ';'],
    ['tab', '\t'],
    ['pipe', '|'],
  ]) {
    it(`finds the ${name} delimiter`, () => {
      const text = [
        `Stamp${d}Level (m)${d}Note`,
        ...rows.map((t, i) => `${t}${d}${2 - i * 0.1}${d}ok`),
      ].join('\n');
      const s = read(text);
      expect(s.notes.find((n) => n.code === 'delimiter')!.message).toContain(name);
      expect(Array.from(s.levelM)).toEqual([2, 1.9, 1.8]);
      expect(Array.from(s.timeS)).toEqual([0, 10, 20]);
    });
  }
  it('detects a decimal comma in a semicolon file and is not fooled into splitting on commas', () => {
    const s = read(
      [
        'Stamp;Level (m);T (°C)',
        '2026-05-04 10:00:00;1,234;12,5',
        '2026-05-04 10:00:10;1,200;12,5',
        '2026-05-04 10:00:20;1,166;12,6',
      ].join('\r\n'),
    );
    expect(s.notes.find((n) => n.code === 'delimiter')!.message).toContain('semicolon');
    expect(s.notes.find((n) => n.code === 'decimal')!.message).toContain('1,234');
    expect(Array.from(s.levelM)).toEqual([1.234, 1.2, 1.166]);
    expect(Array.from(s.temperatureC!)).toEqual([12.5, 12.5, 12.6]);
  });
  it('takes the delimiter and decimal mark when given', () => {
    const s = read('a:b\nStamp#Level (m)\n2026-05-04 10:00:00#1,5\n2026-05-04 10:00:10#1,4\n', {
      delimiter: '#',
      decimal: ',',
    });
    expect(Array.from(s.levelM)).toEqual([1.5, 1.4]);
  });
  it('keeps a metadata preamble, split into key and value where it looks like that', () => {
    const text = [
      '# Logger export',
      'Site: East basin',
      'Interval = 10 s',
      'Channel,3',
      '',
      'Stamp,Depth (m)',
      ...rows.map((t) => `${t},1.0`),
    ].join('\n');
    const s = read(text);
    expect(s.metadata).toEqual([
      { line: 1, text: '# Logger export' },
      { line: 2, text: 'Site: East basin', key: 'Site', value: 'East basin' },
      { line: 3, text: 'Interval = 10 s', key: 'Interval', value: '10 s' },
      { line: 4, text: 'Channel,3', key: 'Channel', value: '3' },
    ]);
    expect(s.notes.find((n) => n.code === 'header')!.message).toMatch(/line 6/);
    expect(Array.from(s.sourceLine)).toEqual([7, 8, 9]);
  });
  it('reads quoted fields holding the delimiter', () => {
    const text = [
      '"Stamp","Level, gauge side (cm)","Comment"',
      ...rows.map((t, i) => `"${t}","${100 - i}","valve open, slow"`),
    ].join('\n');
    const s = read(text);
    expect(Array.from(s.levelM)).toEqual([1, 0.99, 0.98]);
    expect(s.columns[1].header).toBe('Level, gauge side (cm)');
  });
  it('reads old Mac line ends (CR only)', () => {
    const s = read(['Stamp,Level (m)', ...rows.map((t) => `${t},1`)].join('\r'));
    expect(s.timeS.length).toBe(3);
  });
  it('reads a file without a header when the columns are named by position and unit', () => {
    const s = read(rows.map((t, i) => `${t},${50 - i}`).join('\n'), { levelColumn: 2, unit: 'cm' });
    expect(s.notes.find((n) => n.code === 'header')!.message).toMatch(/no header/);
    expect(Array.from(s.levelM)).toEqual([0.5, 0.49, 0.48]);
  });
});

describe('metadata that looks like data', () => {
  it('is not taken for data rows when a header follows it', () => {
    const text = [
      'Interval;1',
      'Channels;2',
      'Serial;4471',
      'Stamp;Level (m)',
      ...rows.map((t) => `${t};1,5`),
    ].join('\n');
    const s = read(text);
    expect(s.metadata.map((m) => m.key)).toEqual(['Interval', 'Channels', 'Serial']);
    expect(s.timeS.length).toBe(3);
  });
});

describe('quoted fields that need a full CSV parser', () => {
  it('reads doubled quotes and line breaks inside quotes, keeping line numbers', () => {
    const text = [
      'Stamp,Level (m),Comment',
      `${rows[0]},1.0,"said ""open"""`,
      `${rows[1]},0.9,"two`,
      `lines"`,
      `${rows[2]},0.8,plain`,
    ].join('\n');
    const s = read(text);
    expect(Array.from(s.levelM)).toEqual([1, 0.9, 0.8]);
    expect(Array.from(s.sourceLine)).toEqual([2, 3, 5]);
  });
});

describe('padding rows', () => {
  it('skips rows of empty fields as blank lines, without a warning', () => {
    const s = read(
      ['Stamp,Level (m),Note', ...rows.map((t) => `${t},1,`), ',,', ' , ,', ''].join('\n'),
    );
    expect(s.timeS.length).toBe(3);
    expect(s.warnings).toEqual([]);
  });
});
