/**
 * Double-double arithmetic: a number carried as the unevaluated sum hi + lo of two doubles with
 * |lo| ≤ ulp(hi)/2, about 106 bits (~32 digits). The StRD harness needs it because some certified
 * residual sums of squares (Lanczos1: 1.4e-25) sit at the rounding level of double data: the
 * residuals y − f(x; b) must be formed from the decimal data and the model to well below 1e-16
 * relative before they are rounded to doubles for the engine. Harness-only: core never imports it.
 *
 * Algorithms after the classic error-free transformations (Knuth's two-sum, Dekker's split and
 * product) and the usual double-double library recipes: exp by ln 2 and 2^-9 argument reduction
 * with a Taylor series and repeated squaring; log, atan and sqrt by one Newton step from the
 * double result; sin/cos by reduction modulo π/2 and a Taylor series. Accuracy ~1e-31 relative
 * for the arguments the StRD models produce (|angles| ≪ 1e6). Below ~1e-292 the low part is a
 * subnormal double and the precision falls back toward a double's.
 */

export interface Dd {
  readonly hi: number;
  readonly lo: number;
}

/** 2^27 + 1: Dekker's splitting constant for 53-bit doubles. */
const SPLITTER = 134217729;
/** Above 2^996 the split's SPLITTER·a would overflow: split a scaled copy instead. */
const SPLIT_LIMIT = 2 ** 996;

/** The upper 26 bits of a (Dekker's split); a − upper(a) is the exact lower part. */
function upper(a: number): number {
  if (a > SPLIT_LIMIT || a < -SPLIT_LIMIT) {
    const b = a * 2 ** -28;
    const t = SPLITTER * b;
    return (t - (t - b)) * 2 ** 28;
  }
  const t = SPLITTER * a;
  return t - (t - a);
}

export function fromNumber(a: number): Dd {
  return { hi: a, lo: 0 };
}

export function toNumber(a: Dd): number {
  return a.hi + a.lo;
}

export const ZERO: Dd = fromNumber(0);
export const ONE: Dd = fromNumber(1);

export function neg(a: Dd): Dd {
  return { hi: -a.hi, lo: -a.lo };
}

/** hi + lo where |hi| ≥ |lo| is known: the cheap renormalisation. */
function quick(hi: number, lo: number): Dd {
  const s = hi + lo;
  return { hi: s, lo: lo - (s - hi) };
}

export function add(a: Dd, b: Dd): Dd {
  let s = a.hi + b.hi;
  let v = s - a.hi;
  let e = a.hi - (s - v) + (b.hi - v);
  const t = a.lo + b.lo;
  v = t - a.lo;
  const f = a.lo - (t - v) + (b.lo - v);
  e += t;
  const h = s + e;
  e -= h - s;
  s = h;
  e += f;
  return quick(s, e);
}

export function addNum(a: Dd, b: number): Dd {
  const s = a.hi + b;
  const v = s - a.hi;
  const e = a.hi - (s - v) + (b - v) + a.lo;
  return quick(s, e);
}

export function sub(a: Dd, b: Dd): Dd {
  return add(a, { hi: -b.hi, lo: -b.lo });
}

/** Exact product of two doubles as a double-double (Dekker). */
export function twoProd(a: number, b: number): Dd {
  const p = a * b;
  const ah = upper(a);
  const al = a - ah;
  const bh = upper(b);
  const bl = b - bh;
  const e = ah * bh - p + ah * bl + al * bh + al * bl;
  return { hi: p, lo: e };
}

export function mul(a: Dd, b: Dd): Dd {
  const p = twoProd(a.hi, b.hi);
  return quick(p.hi, p.lo + (a.hi * b.lo + a.lo * b.hi));
}

export function mulNum(a: Dd, b: number): Dd {
  const p = twoProd(a.hi, b);
  return quick(p.hi, p.lo + a.lo * b);
}

export function sqr(a: Dd): Dd {
  return mul(a, a);
}

export function div(a: Dd, b: Dd): Dd {
  const q1 = a.hi / b.hi;
  let r = sub(a, mulNum(b, q1));
  const q2 = r.hi / b.hi;
  r = sub(r, mulNum(b, q2));
  const q3 = r.hi / b.hi;
  return addNum(quick(q1, q2), q3);
}

/** 2^k for |k| ≤ 1000, exact doubles (a table: exp scales every result by one). */
const POW2_RANGE = 1000;
const POW2 = Float64Array.from({ length: 2 * POW2_RANGE + 1 }, (_, i) => 2 ** (i - POW2_RANGE));

/** a · 2^k for integer k, exact (barring overflow and subnormals). */
export function ldexp(a: Dd, k: number): Dd {
  if (k >= -POW2_RANGE && k <= POW2_RANGE) {
    const f = POW2[k + POW2_RANGE];
    return { hi: a.hi * f, lo: a.lo * f };
  }
  // Two factors so that 2^k itself never overflows for |k| up to 2000.
  const h = Math.trunc(k / 2);
  const f1 = 2 ** h;
  const f2 = 2 ** (k - h);
  return { hi: a.hi * f1 * f2, lo: a.lo * f1 * f2 };
}

export function sqrt(a: Dd): Dd {
  if (!(a.hi > 0)) return a.hi === 0 ? ZERO : fromNumber(NaN);
  if (a.hi === Infinity) return fromNumber(Infinity);
  const q = Math.sqrt(a.hi);
  // One Newton step: q + (a − q²)/(2q), with q² exact.
  const d = sub(a, twoProd(q, q));
  return quick(q, d.hi / (2 * q));
}

/**
 * Decimal text → double-double. The significant digits are read in 15-digit groups (each an
 * exact double, the first two combined exactly), then divided or multiplied by the power of ten,
 * so the result is the decimal's value to within one double-double rounding. Undefined when the
 * text is not a plain decimal number.
 */
export function parseDecimal(text: string): Dd | undefined {
  const m = /^([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text.trim());
  if (!m || (m[2] === '' && (m[3] ?? '') === '')) return undefined;
  const frac = m[3] ?? '';
  const digits = (m[2] + frac).replace(/^0+/, '');
  const sign = m[1] === '-' ? -1 : 1;
  if (digits === '') return fromNumber(sign * 0);
  let scale = Number(m[4] ?? '0') - frac.length;
  const trimmed = digits.replace(/0+$/, '');
  scale += digits.length - trimmed.length;
  let n = fromNumber(Number(trimmed.slice(0, 15)));
  for (let k = 15; k < trimmed.length; k += 15) {
    const group = trimmed.slice(k, k + 15);
    n = addNum(mulNum(n, tenTo(group.length)), Number(group));
  }
  // Beyond ±290 the power of ten leaves the double range; such values are far outside the StRD data.
  if (Math.abs(scale) > 290) return fromNumber(Number(text));
  const value = scale >= 0 ? mul(n, powerOfTen(scale)) : div(n, powerOfTen(-scale));
  return sign < 0 ? neg(value) : value;
}

/** 10^k for k ≥ 0: exact up to 10^22 (an exact double), within rounding beyond. */
function powerOfTen(k: number): Dd {
  let p = fromNumber(tenTo(Math.min(k, 22)));
  for (let rest = k - 22; rest > 0; rest -= 22) p = mulNum(p, tenTo(Math.min(rest, 22)));
  return p;
}

/** 10^k for 0 ≤ k ≤ 22 as the correctly rounded (here: exact) double, read from its decimal text. */
function tenTo(k: number): number {
  return Number(`1e${k}`);
}

function constant(text: string): Dd {
  const v = parseDecimal(text);
  if (!v) throw new TypeError(`bad constant ${text}`);
  return v;
}

// Mathematical constants (facts of mathematics, digits from memory; each is checked against an
// independent identity in test/reference/nist/double-double.test.ts).
export const PI = constant('3.14159265358979323846264338327950288419716939937510');
export const LN2 = constant('0.69314718055994530941723212145817656807550013436026');
const HALF_PI = ldexp(PI, -1);

/** 1/n! for n = 0..28, each from one double-double division of an exact n! (n! is exact to 22!). */
const INV_FACT: Dd[] = (() => {
  const out: Dd[] = [];
  let f = ONE;
  for (let n = 0; n <= 28; n++) {
    if (n > 0) f = mulNum(f, n);
    out.push(div(ONE, f));
  }
  return out;
})();
const INV_FACT_HI = Float64Array.from(INV_FACT, (v) => v.hi);
const INV_FACT_LO = Float64Array.from(INV_FACT, (v) => v.lo);

// Scalar kernels for the series loops: the same add and multiply as above, leaving the result in
// R = [hi, lo] instead of allocating, which makes exp and sin several times faster (the harness calls
// them for every observation at every evaluation).
const R = new Float64Array(2);

function kAdd(ah: number, al: number, bh: number, bl: number): void {
  let s = ah + bh;
  let v = s - ah;
  let e = ah - (s - v) + (bh - v);
  const t = al + bl;
  v = t - al;
  const f = al - (t - v) + (bl - v);
  e += t;
  const h = s + e;
  e -= h - s;
  s = h;
  e += f;
  R[0] = s + e;
  R[1] = e - (R[0] - s);
}

function kMul(ah: number, al: number, bh: number, bl: number): void {
  const p = ah * bh;
  const ahh = upper(ah);
  const ahl = ah - ahh;
  const bhh = upper(bh);
  const bhl = bh - bhh;
  const e = ahh * bhh - p + ahh * bhl + ahl * bhh + ahl * bhl + (ah * bl + al * bh);
  R[0] = p + e;
  R[1] = e - (R[0] - p);
}

// Reference exp: a = k·ln2 + r, r reduced further by 2^-9; e^r − 1 by Taylor to r^9/9!
// (|r| ≤ 6.8e-4, so the first omitted term is below 1e-35 of the sum), then (e^r − 1) squared back
// up nine times. Accurate but slow; it only builds the table of the fast exp below.
const EXP_HALVINGS = 9;
const EXP_TERMS = 9;
const EXP_SCALE = 2 ** -EXP_HALVINGS;

function expByHalving(a: Dd): Dd {
  const k = Math.round(a.hi / LN2.hi);
  kMul(LN2.hi, LN2.lo, -k, 0);
  kAdd(a.hi, a.lo, R[0], R[1]);
  const rh = R[0] * EXP_SCALE;
  const rl = R[1] * EXP_SCALE;
  let ph = INV_FACT_HI[EXP_TERMS];
  let pl = INV_FACT_LO[EXP_TERMS];
  for (let n = EXP_TERMS - 1; n >= 1; n--) {
    kMul(ph, pl, rh, rl);
    kAdd(R[0], R[1], INV_FACT_HI[n], INV_FACT_LO[n]);
    ph = R[0];
    pl = R[1];
  }
  kMul(ph, pl, rh, rl); // e^r − 1
  // e^{2r} − 1 = 2s + s², which keeps the small part's digits.
  for (let i = 0; i < EXP_HALVINGS; i++) {
    const sh = R[0];
    const sl = R[1];
    kMul(sh, sl, sh, sl);
    kAdd(2 * sh, 2 * sl, R[0], R[1]);
  }
  kAdd(R[0], R[1], 1, 0);
  return ldexp({ hi: R[0], lo: R[1] }, k);
}

// Fast exp: a = k·ln2 + j/256 + i/65536 + r with |i| ≤ 128 and |r| ≤ 2^-17; e^{j/256} and
// e^{i/65536} come from two tables, e^r from Taylor. Terms from r^3/3! on are below 1e-16, so they
// need only double precision (they add errors below 1e-32); r^7/7! and beyond (< 1e-39) are left out.
const COARSE = 256;
const FINE = 65536;
const COARSE_HALF = Math.ceil((LN2.hi / 2) * COARSE);
const FINE_HALF = FINE / COARSE / 2;
function expTable(half: number, step: number): [Float64Array, Float64Array] {
  const t = Array.from({ length: 2 * half + 1 }, (_, i) =>
    expByHalving(fromNumber((i - half) / step)),
  );
  return [Float64Array.from(t, (v) => v.hi), Float64Array.from(t, (v) => v.lo)];
}
const [COARSE_HI, COARSE_LO] = expTable(COARSE_HALF, COARSE);
const [FINE_HI, FINE_LO] = expTable(FINE_HALF, FINE);
const DOUBLE_TAIL_FROM = 3;
const LAST_TERM = 6;

export function exp(a: Dd): Dd {
  if (a.hi > 709.78) return fromNumber(Infinity);
  if (a.hi < -745.2) return ZERO;
  if (Number.isNaN(a.hi)) return fromNumber(NaN);
  if (a.hi === 0 && a.lo === 0) return ONE;
  const k = Math.round(a.hi / LN2.hi);
  kMul(LN2.hi, LN2.lo, -k, 0);
  kAdd(a.hi, a.lo, R[0], R[1]);
  const m = Math.round(R[0] * FINE);
  const j = Math.round(m / (FINE / COARSE));
  const i = m - j * (FINE / COARSE);
  kAdd(R[0], R[1], -m / FINE, 0);
  const rh = R[0];
  const rl = R[1];
  let q = INV_FACT_HI[LAST_TERM];
  for (let n = LAST_TERM - 1; n >= DOUBLE_TAIL_FROM; n--) q = q * rh + INV_FACT_HI[n];
  // e^r = 1 + r·(1 + r·(1/2 + r·q))
  kMul(rh, rl, q, 0);
  for (let n = DOUBLE_TAIL_FROM - 1; n >= 0; n--) {
    kAdd(R[0], R[1], INV_FACT_HI[n], INV_FACT_LO[n]);
    if (n > 0) kMul(R[0], R[1], rh, rl);
  }
  kMul(R[0], R[1], FINE_HI[i + FINE_HALF], FINE_LO[i + FINE_HALF]);
  kMul(R[0], R[1], COARSE_HI[j + COARSE_HALF], COARSE_LO[j + COARSE_HALF]);
  return ldexp({ hi: R[0], lo: R[1] }, k);
}

export function log(a: Dd): Dd {
  if (!(a.hi > 0)) return fromNumber(a.hi === 0 ? -Infinity : NaN);
  if (a.hi === Infinity) return a;
  if (a.hi > 1e250 || a.hi < 1e-250) {
    // e^{−x} would be near the subnormal range: take the power of two out first (exact).
    const k = Math.round(Math.log2(a.hi));
    return add(log(ldexp(a, -k)), mulNum(LN2, k));
  }
  // Newton on e^x = a: x ← x + a·e^{−x} − 1, from the double logarithm (error 1e-16 → 1e-32).
  const x = Math.log(a.hi);
  return addNum(addNum(mul(a, exp(fromNumber(-x))), -1), x);
}

/** a^e for a > 0, as exp(e·log a). */
export function pow(a: Dd, e: Dd): Dd {
  return exp(mul(e, log(a)));
}

// sin on |r| ≤ π/4 by Taylor to r^27/27! (the next term is below 1e-34 of the sum). Terms from
// r^19/19! on are below 1e-19, so they are summed in double.
const SIN_TERMS = 13;
const SIN_DOUBLE_FROM = 9;

function sinTaylor(r: Dd): Dd {
  kMul(r.hi, r.lo, r.hi, r.lo);
  const r2h = R[0];
  const r2l = R[1];
  const sign = (j: number): number => (j % 2 === 0 ? 1 : -1); // (−1)^j / (2j+1)!
  let q = sign(SIN_TERMS) * INV_FACT_HI[2 * SIN_TERMS + 1];
  for (let j = SIN_TERMS - 1; j >= SIN_DOUBLE_FROM; j--)
    q = q * r2h + sign(j) * INV_FACT_HI[2 * j + 1];
  kMul(r2h, r2l, q, 0);
  for (let j = SIN_DOUBLE_FROM - 1; j >= 0; j--) {
    kAdd(R[0], R[1], sign(j) * INV_FACT_HI[2 * j + 1], sign(j) * INV_FACT_LO[2 * j + 1]);
    kMul(R[0], R[1], j > 0 ? r2h : r.hi, j > 0 ? r2l : r.lo);
  }
  return { hi: R[0], lo: R[1] };
}

/** [sin a, cos a]. Reduction by multiples of π/2 in double-double, so accuracy is absolute ~|a|·1e-32. */
export function sinCos(a: Dd): [Dd, Dd] {
  if (!Number.isFinite(a.hi)) return [fromNumber(NaN), fromNumber(NaN)];
  const k = Math.round(a.hi / HALF_PI.hi);
  const r = sub(a, mulNum(HALF_PI, k));
  const s = sinTaylor(r);
  const c = sqrt(addNum(neg(sqr(s)), 1)); // cos r ≥ 0 on |r| ≤ π/4
  switch (((k % 4) + 4) % 4) {
    case 0:
      return [s, c];
    case 1:
      return [c, neg(s)];
    case 2:
      return [neg(s), neg(c)];
    default:
      return [neg(c), s];
  }
}

export function sin(a: Dd): Dd {
  return sinCos(a)[0];
}

export function cos(a: Dd): Dd {
  return sinCos(a)[1];
}

export function atan(w: Dd): Dd {
  if (Number.isNaN(w.hi)) return w;
  if (!Number.isFinite(w.hi)) return w.hi > 0 ? HALF_PI : neg(HALF_PI);
  // Newton on sin z − w·cos z = 0 from the double arctangent; the correction needs only double
  // precision, the residual sin z − w·cos z needs double-double (it cancels to ~1e-16).
  const z = Math.atan(w.hi);
  const [s, c] = sinCos(fromNumber(z));
  const f = sub(s, mul(w, c));
  return quick(z, -f.hi / (c.hi + w.hi * s.hi));
}
