/**
 * CSV cells (core/report/csv.ts): text that begins with =, +, -, @, tab or carriage return gets a
 * leading apostrophe inside quotes (OWASP "CSV Injection" guidance); RFC 4180 quoting otherwise;
 * numbers stay numbers.
 */
import { describe, expect, it } from 'vitest';
import { csvCell, csvText } from '../../../server/core/report/csv.js';

describe('csvCell', () => {
  it('neutralises every formula start the guidance names', () => {
    expect(csvCell('=1+2')).toBe(`"'=1+2"`);
    expect(csvCell('+SUM(A1:A2)')).toBe(`"'+SUM(A1:A2)"`);
    expect(csvCell('-2+3')).toBe(`"'-2+3"`);
    expect(csvCell('@cmd')).toBe(`"'@cmd"`);
    expect(csvCell('\tx')).toBe(`"'\tx"`);
    expect(csvCell('\rx')).toBe(`"'\rx"`);
    expect(csvCell('=HYPERLINK("http://example.invalid")')).toBe(
      `"'=HYPERLINK(""http://example.invalid"")"`,
    );
  });

  it('quotes per RFC 4180 and leaves plain text and numbers alone', () => {
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('T-101')).toBe('T-101');
    expect(csvCell(-3.25)).toBe('-3.25');
    expect(csvCell(1e-5)).toBe('0.00001');
    expect(csvCell(Number.NaN)).toBe('');
    expect(csvCell(null)).toBe('');
    expect(csvCell(true)).toBe('true');
    expect(
      csvText([
        ['a', 1],
        ['=b', -2],
      ]),
    ).toBe(`a,1\r\n"'=b",-2\r\n`);
  });
});
