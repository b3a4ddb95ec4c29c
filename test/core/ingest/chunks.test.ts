import { describe, expect, it } from 'vitest';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

// The reader decodes and splits in 1 MiB pieces; these files put multi-byte characters and
// quoted line breaks across every piece boundary somewhere.
describe('files larger than one decoding piece', () => {
  it('keeps rows, values and line numbers across piece boundaries', () => {
    const lines = ['Elapsed (s),Level (m),Remark'];
    const want: number[] = [];
    let line = 2;
    for (let i = 0; i < 100_000; i++) {
      const remark =
        i % 7 === 0 ? '"valve ""B"", 2 turns\nsecond line"' : i % 3 === 0 ? 'água °C ✓' : 'ok';
      lines.push(`${i},${(5 - i / 20000).toFixed(5)},${remark}`);
      want.push(line);
      line += remark.includes('\n') ? 2 : 1;
    }
    const bytes = new TextEncoder().encode(lines.join('\n') + '\n');
    expect(bytes.length).toBeGreaterThan(2 << 20);
    const s = readLevelLog(bytes, 'big.csv');
    expect(s.timeS.length).toBe(100_000);
    expect(s.timeS[99_999]).toBe(99_999);
    expect(s.levelM[45_678]).toBe(Number((5 - 45_678 / 20000).toFixed(5)));
    expect(Array.from(s.sourceLine)).toEqual(want);
    expect(s.warnings).toEqual([]);
  });
  it('plain unquoted files too', () => {
    const rows = Array.from(
      { length: 120_000 },
      (_, i) => `${String(i / 10).replace('.', ',')};${(3 - i / 1e5).toFixed(5).replace('.', ',')}`,
    );
    const s = readLevelLog(
      new TextEncoder().encode(`t (s);Level (m)\r\n${rows.join('\r\n')}`),
      'big.csv',
    );
    expect(s.timeS.length).toBe(120_000);
    expect(s.levelM[119_999]).toBeCloseTo(3 - 119_999 / 1e5, 12);
    expect(s.sourceLine[119_999]).toBe(120_001);
  });
});
