/**
 * Digits: how many a number earns and how it is written. Pure; one function per rule.
 * Written by hand: Intl.NumberFormat rounds half-even on some engines and cannot round to an
 * uncertainty's decimal place, and the same digits must come out in Node and in the browser.
 */

/** A number with exactly `decimals` digits after the point (trailing zeros kept); "—" for none. */
export function fixedText(x: number | null | undefined, decimals: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (decimals >= 0) {
    const s = x.toFixed(Math.min(20, decimals));
    return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
  }
  // rounding to tens, hundreds…: 56789 at decimals −2 → 56800
  const step = 10 ** -decimals;
  const r = Math.round(x / step) * step;
  return (Object.is(r, -0) ? 0 : r).toFixed(0);
}

/** The decimal exponent of x as written in scientific notation (0.0995 → −2, 1000 → 3). */
export function decimalExponent(x: number): number {
  return Number(Math.abs(x).toExponential(12).split('e')[1]);
}

/**
 * Decimal places so that x shows `digits` significant digits. Rounds first: 0.0995 to two digits
 * is 0.10 (2 places), not 0.100.
 */
export function decimalsForSignificant(x: number, digits: number): number {
  if (!(Math.abs(x) > 0) || !Number.isFinite(x)) return 0;
  const rounded = Number(Math.abs(x).toPrecision(digits));
  return digits - 1 - decimalExponent(rounded);
}

/**
 * x to `digits` significant digits, trailing zeros kept (0.6100, not 0.61), and no exponent for
 * the magnitudes a person reads (1e-6 ≤ |x| < 1e9); outside that range, scientific notation.
 */
export function significantText(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return (0).toFixed(Math.max(0, digits - 1));
  const a = Math.abs(x);
  if (a < 1e-6 || a >= 1e9) return x.toExponential(digits - 1);
  return fixedText(x, decimalsForSignificant(x, digits));
}

/**
 * Inputs and diagnostics (settings, window bounds, RMSE): x to `digits` significant digits with
 * trailing zeros dropped (0.05 m, not 0.05000 m: the digits of an input claim no resolution);
 * fixed notation from 1e-3 to below 1e5, exponential outside. Results go through
 * measurementText or toU, which keep their zeros.
 */
export const sig = (x: number | null | undefined, digits = 4): string => {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e5 ? String(+x.toPrecision(digits)) : x.toExponential(digits - 1);
};

/**
 * x shown to the resolution of its uncertainty u: two significant digits of u decide the last
 * digit shown of x (JCGM 100:2008, 7.2.6). Without a usable u, six significant digits.
 */
export const toU = (x: number | null | undefined, u: number | null | undefined): string => {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (!u || !Number.isFinite(u) || u <= 0) return sig(x, 6);
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) {
    const digits = Math.max(
      2,
      Math.min(12, Math.floor(Math.log10(a)) - Math.floor(Math.log10(u)) + 2),
    );
    return x.toExponential(digits - 1);
  }
  return x.toFixed(Math.max(0, Math.min(12, 1 - Math.floor(Math.log10(u)))));
};

/**
 * Inputs and diagnostics for the workbench: `digits` significant digits, trailing zeros dropped,
 * no exponent for 1e-6 ≤ |x| < 1e9 (0.0003976, not 3.976e-4); outside, scientific notation.
 */
export function plainText(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a < 1e-6 || a >= 1e9) return x.toExponential(digits - 1);
  const t = fixedText(x, Math.max(0, decimalsForSignificant(x, digits)));
  return t.includes('.') ? t.replace(/\.?0+$/, '') : t;
}
