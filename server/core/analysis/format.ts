/**
 * Number formatting shared by every report (the CLI's text report and the PDF renderer), so the
 * same value prints the same way everywhere. Pure.
 */

/**
 * x to `digits` significant digits; fixed notation from 1e-3 to below 1e5, exponential outside.
 * Trailing zeros are dropped in fixed notation (0.05 m, not 0.05000 m): these are inputs and
 * diagnostics, whose resolution is not claimed by the digits shown; results go through toU.
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
