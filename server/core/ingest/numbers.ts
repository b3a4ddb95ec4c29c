/**
 * Hand-written fast path: parseFloat needs a substring per cell; this one reads the offsets and falls back to it.
 *
 * Decimal numbers read straight from the text, without slicing a substring per cell.
 * Up to 15 significant digits and a power of ten up to 22 the result is one correctly
 * rounded division or multiplication of exact doubles (the classic fast path), so it equals
 * parseFloat; anything longer falls back to parseFloat.
 */
const POW10 = [
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17,
  1e18, 1e19, 1e20, 1e21, 1e22,
];

const SPACE = 32,
  TAB = 9,
  PLUS = 43,
  MINUS = 45,
  DOT = 46,
  COMMA = 44,
  D0 = 48,
  D9 = 57;

/** The number in s[a, b) with `decimal` ('.' or ',') as the decimal mark, or NaN. */
export function parseNumber(s: string, a: number, b: number, decimal: number): number {
  while (a < b && (s.charCodeAt(a) === SPACE || s.charCodeAt(a) === TAB)) a++;
  while (b > a && (s.charCodeAt(b - 1) === SPACE || s.charCodeAt(b - 1) === TAB)) b--;
  if (a >= b) return NaN;
  const begin = a;
  let neg = false;
  let c = s.charCodeAt(a);
  if (c === MINUS || c === PLUS) {
    neg = c === MINUS;
    a++;
  }
  let mant = 0,
    sig = 0,
    scale = 0,
    any = false;
  for (; a < b; a++) {
    c = s.charCodeAt(a);
    if (c < D0 || c > D9) break;
    any = true;
    if (sig > 0 || c !== D0) sig++;
    if (sig <= 15) mant = mant * 10 + (c - D0);
    else scale++;
  }
  if (a < b && s.charCodeAt(a) === decimal) {
    a++;
    for (; a < b; a++) {
      c = s.charCodeAt(a);
      if (c < D0 || c > D9) break;
      any = true;
      if (sig > 0 || c !== D0) sig++;
      if (sig <= 15) {
        mant = mant * 10 + (c - D0);
        scale--;
      }
    }
  }
  if (!any) return NaN;
  if (a < b) {
    c = s.charCodeAt(a);
    if (c !== 101 && c !== 69) return NaN; // e or E
    a++;
    let eneg = false;
    if (a < b && (s.charCodeAt(a) === MINUS || s.charCodeAt(a) === PLUS)) {
      eneg = s.charCodeAt(a) === MINUS;
      a++;
    }
    let e = 0,
      edig = 0;
    for (; a < b; a++) {
      c = s.charCodeAt(a);
      if (c < D0 || c > D9) return NaN;
      if (e < 100000) e = e * 10 + (c - D0);
      edig++;
    }
    if (edig === 0) return NaN;
    scale += eneg ? -e : e;
  }
  let v: number;
  if (sig <= 15 && scale >= -22 && scale <= 22) {
    v = scale < 0 ? mant / POW10[-scale] : mant * POW10[scale];
  } else {
    let t = s.slice(begin, b);
    if (decimal === COMMA) t = t.replace(',', '.');
    v = Math.abs(parseFloat(t));
  }
  return neg ? -v : v;
}

export const DECIMAL_DOT = DOT;
export const DECIMAL_COMMA = COMMA;

/**
 * The number in s[a, b) whose integer part may be grouped in threes by `group` (a code; 0 for
 * none), e.g. "2,099.9" or "2.099,9". Grouping that is not in threes is not a number (NaN).
 */
export function parseGroupedNumber(
  s: string,
  a: number,
  b: number,
  decimal: number,
  group: number,
): number {
  if (
    group === 0 ||
    s.indexOf(String.fromCharCode(group), a) < 0 ||
    s.indexOf(String.fromCharCode(group), a) >= b
  )
    return parseNumber(s, a, b, decimal);
  const text = s.slice(a, b).trim();
  const g = String.fromCharCode(group);
  const d = String.fromCharCode(decimal);
  const dot = text.indexOf(d);
  const int = dot < 0 ? text : text.slice(0, dot);
  if (
    !/^[+-]?\d{1,3}$/.test(int.split(g)[0]) ||
    int
      .split(g)
      .slice(1)
      .some((p) => !/^\d{3}$/.test(p))
  )
    return NaN;
  const plain = int.split(g).join('') + (dot < 0 ? '' : text.slice(dot));
  return parseNumber(plain, 0, plain.length, decimal);
}
