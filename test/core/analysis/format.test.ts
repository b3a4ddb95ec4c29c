import { describe, expect, it } from 'vitest';
import { sig, toU } from '../../../server/core/analysis/format.js';

describe('report number formats (one module for the CLI and the PDF)', () => {
  it('toU: the GUM example, m_S = 100.021 47 g with u_c = 0.35 mg, is shown to the 0.01 mg digit', () => {
    // JCGM 100:2008 (GUM) 7.2.2, the example of a result with its combined standard uncertainty.
    expect(toU(100.02147, 0.00035)).toBe('100.02147');
  });
  it('toU: two significant digits of u set the last digit of x (JCGM 100:2008, 7.2.6)', () => {
    expect(toU(0.61234567, 0.0036)).toBe('0.6123');
    expect(toU(0.61234567, 0.036)).toBe('0.612');
    expect(toU(1234.5678, 12)).toBe('1235');
    expect(toU(1.234567e-6, 2.2e-8)).toBe('1.235e-6'); // u = 0.022e-6: last digit 1e-9
    expect(toU(0.5, 0)).toBe('0.5');
    expect(toU(Number.NaN, 1)).toBe('—');
  });
  it('sig: significant digits, no trailing zeros in fixed notation, exponential outside 1e-3 … 1e5', () => {
    expect(sig(0.05)).toBe('0.05');
    expect(sig(2.44691185)).toBe('2.447');
    expect(sig(3.6e-4, 2)).toBe('3.6e-4');
    expect(sig(2.9e8, 2)).toBe('2.9e+8');
    expect(sig(0)).toBe('0');
    expect(sig(null)).toBe('—');
  });
});
