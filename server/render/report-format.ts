/** Number formatting for reports: significant digits, and a value to the resolution of its uncertainty. */
export const sig = (x: number | null | undefined, digits = 4): string => {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e5 ? String(+x.toPrecision(digits)) : x.toExponential(digits - 1);
};

/** Two significant digits of u decide the last digit shown of x (JCGM 100:2008, 7.2.6). */
export const toU = (x: number | null | undefined, u: number | null | undefined): string => {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (!u || !Number.isFinite(u) || u <= 0) return sig(x, 6);
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) {
    const digits = Math.max(2, Math.min(12, Math.floor(Math.log10(a)) - Math.floor(Math.log10(u)) + 2));
    return x.toExponential(digits - 1);
  }
  return x.toFixed(Math.max(0, Math.min(12, 1 - Math.floor(Math.log10(u)))));
};

export const bytesText = (n: number) => (n < 1024 ? `${n} B` : n < 1048576 ? `${(n / 1024).toFixed(1)} KiB` : `${(n / 1048576).toFixed(2)} MiB`);

export const dateText = (iso: string | null | undefined) => (iso ? iso.replace('T', ' ').replace(/\.000Z$|Z$/, ' UTC') : '—');
