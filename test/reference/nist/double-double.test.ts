import { describe, expect, it } from 'vitest';
import {
  LN2,
  ONE,
  PI,
  add,
  atan,
  cos,
  div,
  exp,
  fromNumber,
  log,
  mul,
  mulNum,
  parseDecimal,
  pow,
  sin,
  sinCos,
  sqr,
  sqrt,
  sub,
  toNumber,
  twoProd,
} from '../../../server/reference/nist/double-double.js';
import type { Dd } from '../../../server/reference/nist/double-double.js';
import { loadStrdDirectory } from '../../../server/reference/nist/run.js';
import { STRD_DIR } from '../strd-dir.js';

// Reference values are mathematical constants, digits from memory (facts of mathematics, not
// measurements); each is also tied to an identity below that does not use it. Exact checks use
// JavaScript's BigInt (exact integer arithmetic). A double-double carries 106 bits, so its unit
// roundoff is u = 2^-106 ≈ 1.2e-32; the functions are held to 1e-30 relative (~80 u), far below
// anything a double (1.1e-16) could reach.
const E = '2.71828182845904523536028747135266249775724709369995';
const LN10 = '2.30258509299404568401799145468436420760110148862877';
const SQRT2 = '1.41421356237309504880168872420969807856967187537694';
const TOL = 1e-30;

function dd(text: string): Dd {
  const v = parseDecimal(text);
  if (!v) throw new Error(`test constant ${text} did not parse`);
  return v;
}

/** |a − b| / |b| (absolute when b is 0), evaluated in double-double. */
function relErr(a: Dd, b: Dd): number {
  const d = Math.abs(toNumber(sub(a, b)));
  const s = Math.abs(toNumber(b));
  return s === 0 ? d : d / s;
}

/** x · 2^1074 as an exact integer (every finite double times 2^1074 is one). */
function scaled(x: number): bigint {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  const bits = view.getBigUint64(0);
  const sign = bits >> 63n ? -1n : 1n;
  const e = Number((bits >> 52n) & 0x7ffn);
  const frac = bits & ((1n << 52n) - 1n);
  if (e === 0) return sign * frac;
  return sign * ((frac | (1n << 52n)) << BigInt(e - 1));
}

const samples = [-40.3, -7.25, -1, -0.3, -1e-9, 1e-12, 0.015, 0.5, 1.75, 3.3, 12.9, 55.5, 230.125];

describe('double-double: parsing decimal text', () => {
  it('reads integers of up to 30 digits exactly', () => {
    for (const t of [
      '123456789012345678901234567890',
      '9007199254740993',
      '-98765432109876543210',
    ]) {
      const v = dd(t);
      expect((scaled(v.hi) + scaled(v.lo)) >> 1074n).toBe(BigInt(t));
      expect((scaled(v.hi) + scaled(v.lo)) % (1n << 1074n)).toBe(0n);
    }
  });

  it('reads decimal fractions to within 8 units of double-double rounding (exact rational check)', () => {
    // value = N / 10^d; check |(hi + lo)·10^d − N| ≤ 2^-103·N exactly in integers (scaled by 2^1074).
    const cases: [string, bigint, number][] = [
      ['0.1', 1n, 1],
      ['2.044333373291E+00', 2044333373291n, 12],
      ['9.268897180037E-01', 9268897180037n, 13],
      ['1.4307867721E-25', 14307867721n, 35],
      ['3.141592653589793238462643383279E0', 3141592653589793238462643383279n, 30],
    ];
    for (const [text, n, d] of cases) {
      const v = dd(text);
      const err = (scaled(v.hi) + scaled(v.lo)) * 10n ** BigInt(d) - (n << 1074n);
      const abs = err < 0n ? -err : err;
      expect(abs << 103n).toBeLessThanOrEqual(n << 1074n);
    }
  });

  it('gives the nearest double as hi, and refuses text that is not a number', () => {
    for (const t of ['0.1', '-2.5E-3', '80.574E0', '1.000415587559E-01', '0', '-0.0', '1e300']) {
      expect(dd(t).hi).toBe(Number(t));
    }
    expect(dd('0.1').lo).not.toBe(0); // 0.1 is not a binary fraction: the tail is kept
    for (const t of ['', '.', 'abc', '1.2.3', '1e', '0x10'])
      expect(parseDecimal(t)).toBeUndefined();
  });

  it('reads every StRD data value with the same double as Number() and a tail that brings it closer', () => {
    // Source: NIST StRD nonlinear regression files (committed in test/reference/nist-strd).
    for (const ds of loadStrdDirectory(STRD_DIR)) {
      ds.y.forEach((v, i) => expect(ds.yExact[i].hi).toBe(v));
      ds.x.forEach((col, c) => col.forEach((v, i) => expect(ds.xExact[c][i].hi).toBe(v)));
    }
  });
});

describe('double-double: arithmetic', () => {
  it('keeps what a double drops', () => {
    expect(toNumber(sub(add(ONE, fromNumber(1e-20)), ONE))).toBe(1e-20);
    const p = twoProd(134217729, 134217729); // (2^27 + 1)^2 = 2^54 + 2^28 + 1, exact
    expect(scaled(p.hi) + scaled(p.lo)).toBe(((1n << 54n) + (1n << 28n) + 1n) << 1074n);
  });

  it('divides and multiplies back to within a few units of rounding', () => {
    for (const [a, b] of [
      [1, 3],
      [2, 7],
      [-5.5, 0.1],
      [1e10, 3.3e-7],
    ]) {
      const q = div(fromNumber(a), fromNumber(b));
      expect(relErr(mul(q, fromNumber(b)), fromNumber(a))).toBeLessThan(TOL);
    }
    expect(relErr(mulNum(dd('0.1'), 10), ONE)).toBeLessThan(TOL);
  });

  it('sqrt: √2 to 32 digits, and √x² = x', () => {
    expect(relErr(sqrt(fromNumber(2)), dd(SQRT2))).toBeLessThan(TOL);
    for (const x of [0.3, 7, 1e-8, 12345.678])
      expect(relErr(sqr(sqrt(fromNumber(x))), fromNumber(x))).toBeLessThan(TOL);
    expect(Number.isNaN(sqrt(fromNumber(-1)).hi)).toBe(true);
  });
});

describe('double-double: exp, log, pow', () => {
  it('ln 2 (the reduction constant) agrees with the series Σ 1/(k·2^k), summed here in double-double', () => {
    let s = fromNumber(0);
    for (let k = 1; k <= 120; k++) s = add(s, div(ONE, fromNumber(k * 2 ** k)));
    expect(relErr(LN2, s)).toBeLessThan(TOL);
  });

  it('exp(1) = e and exp(0.5)² = e; log(10) = ln 10; log(e) = 1', () => {
    expect(relErr(exp(ONE), dd(E))).toBeLessThan(TOL);
    expect(relErr(sqr(exp(fromNumber(0.5))), dd(E))).toBeLessThan(TOL);
    expect(relErr(log(fromNumber(10)), dd(LN10))).toBeLessThan(TOL);
    expect(relErr(log(dd(E)), ONE)).toBeLessThan(TOL);
  });

  it('exp(a)·exp(b) = exp(a + b), exp(x)·exp(−x) = 1, across the table and reduction ranges', () => {
    for (const a of samples) {
      for (const b of [0.001953125, -0.3466, 2.2, -13.7]) {
        const x = fromNumber(a);
        const y = fromNumber(b);
        expect(relErr(mul(exp(x), exp(y)), exp(add(x, y)))).toBeLessThan(TOL);
      }
      expect(relErr(mul(exp(fromNumber(a)), exp(fromNumber(-a))), ONE)).toBeLessThan(TOL);
    }
    expect(relErr(sqr(exp(fromNumber(350))), exp(fromNumber(700)))).toBeLessThan(TOL);
    expect(exp(fromNumber(710)).hi).toBe(Infinity);
    expect(exp(fromNumber(-746)).hi).toBe(0);
  });

  it('log inverts exp and exp inverts log; the double part agrees with Math', () => {
    for (const a of samples) {
      const x = fromNumber(a);
      expect(Math.abs(toNumber(sub(log(exp(x)), x)))).toBeLessThan(TOL * Math.max(1, Math.abs(a)));
      expect(Math.abs(exp(x).hi - Math.exp(a))).toBeLessThanOrEqual(4e-16 * Math.exp(a));
    }
    for (const v of [1e-30, 0.001, 0.7, 1, 1.0000001, 42, 6.02e23, 1e300]) {
      // exp turns an absolute error of log into a relative one: the bound scales with |ln v|.
      const x = fromNumber(v);
      expect(relErr(exp(log(x)), x)).toBeLessThan(TOL * Math.max(1, Math.abs(Math.log(v))));
    }
    expect(log(fromNumber(0)).hi).toBe(-Infinity);
    expect(Number.isNaN(log(fromNumber(-2)).hi)).toBe(true);
  });

  it('pow: 2^½ = √2, (x^⅓)³ = x, x^a·x^b = x^(a+b)', () => {
    expect(relErr(pow(fromNumber(2), fromNumber(0.5)), dd(SQRT2))).toBeLessThan(TOL);
    const third = div(ONE, fromNumber(3));
    for (const v of [0.125, 5, 55.7, 1e6]) {
      const x = fromNumber(v);
      expect(relErr(mul(sqr(pow(x, third)), pow(x, third)), x)).toBeLessThan(TOL);
      const a = fromNumber(-1.07);
      const b = fromNumber(0.3);
      expect(relErr(mul(pow(x, a), pow(x, b)), pow(x, add(a, b)))).toBeLessThan(
        TOL * Math.max(1, Math.abs(Math.log(v))),
      );
    }
  });
});

describe('double-double: sin, cos, atan', () => {
  it('π: 4·atan(1) and Machin’s formula 16·atan(1/5) − 4·atan(1/239) agree with the constant', () => {
    expect(relErr(mulNum(atan(ONE), 4), PI)).toBeLessThan(TOL);
    const machin = sub(
      mulNum(atan(div(ONE, fromNumber(5))), 16),
      mulNum(atan(div(ONE, fromNumber(239))), 4),
    );
    expect(relErr(machin, PI)).toBeLessThan(TOL);
  });

  it('special angles: sin(π/6) = cos(π/3) = ½, sin(π/4) = √2/2, sin(π) ≈ 0', () => {
    const half = fromNumber(0.5);
    expect(relErr(sin(div(PI, fromNumber(6))), half)).toBeLessThan(TOL);
    expect(relErr(cos(div(PI, fromNumber(3))), half)).toBeLessThan(TOL);
    expect(relErr(sin(mulNum(PI, 0.25)), mulNum(dd(SQRT2), 0.5))).toBeLessThan(TOL);
    expect(Math.abs(toNumber(sin(PI)))).toBeLessThan(TOL);
  });

  it('sin² + cos² = 1, sin 2x = 2 sin x cos x, sin(x + π/2) = cos x, over the ENSO angle range', () => {
    for (const a of [...samples, 25.1327412287, -3.9269908169872414]) {
      const x = fromNumber(a);
      const [s, c] = sinCos(x);
      expect(Math.abs(toNumber(sub(add(sqr(s), sqr(c)), ONE)))).toBeLessThan(TOL);
      const [s2] = sinCos(mulNum(x, 2));
      expect(Math.abs(toNumber(sub(s2, mulNum(mul(s, c), 2))))).toBeLessThan(
        TOL * Math.max(1, Math.abs(a)),
      );
      expect(Math.abs(toNumber(sub(sin(add(x, mulNum(PI, 0.5))), c)))).toBeLessThan(
        TOL * Math.max(1, Math.abs(a)),
      );
      expect(Math.abs(s.hi - Math.sin(a))).toBeLessThan(1e-15 * Math.max(1, Math.abs(a)));
    }
  });

  it('atan: tan(atan x) = x, atan x + atan(1/x) = π/2, odd', () => {
    for (const v of [1e-6, 0.2, 0.99, 1.5, 30, 4e5]) {
      const x = fromNumber(v);
      const [s, c] = sinCos(atan(x));
      expect(relErr(div(s, c), x)).toBeLessThan(TOL * Math.max(1, v));
      expect(relErr(add(atan(x), atan(div(ONE, x))), mulNum(PI, 0.5))).toBeLessThan(TOL);
      expect(toNumber(add(atan(x), atan(fromNumber(-v))))).toBe(0);
    }
    expect(atan(fromNumber(Infinity)).hi).toBe(PI.hi / 2);
  });
});
