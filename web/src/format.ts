/** Numbers for people: every value with its unit, uncertainties with the digits they earn. */

export function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) {
    const [m, e] = x.toExponential(digits - 1).split('e');
    const sup: Record<string, string> = {
      '-': '⁻',
      '0': '⁰',
      '1': '¹',
      '2': '²',
      '3': '³',
      '4': '⁴',
      '5': '⁵',
      '6': '⁶',
      '7': '⁷',
      '8': '⁸',
      '9': '⁹',
    };
    return `${m} × 10${e
      .replace('+', '')
      .split('')
      .map((c) => sup[c] ?? c)
      .join('')}`;
  }
  return x.toLocaleString('en-GB', {
    maximumSignificantDigits: Math.max(digits, 1),
    useGrouping: false,
  });
}

/** Digits after the point so the uncertainty shows two significant figures. */
export function decimalsFor(u: number): number {
  if (!(u > 0) || !Number.isFinite(u)) return 3;
  return Math.min(8, Math.max(0, 1 - Math.floor(Math.log10(u))));
}

/** "0.6120 ± 0.0055" with the value rounded to the uncertainty's last digit. */
export function plusMinus(
  value: number | null | undefined,
  u: number | null | undefined,
  unit = '',
): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (u === null || u === undefined || !Number.isFinite(u))
    return `${num(value, 4)}${unit ? ' ' + unit : ''}`;
  const d = decimalsFor(u);
  return `${value.toFixed(d)} ± ${u.toFixed(d)}${unit ? ' ' + unit : ''}`;
}

/** Areas are small: m² in scientific form reads badly, so mm². */
export function areaMm2(m2: number | null | undefined, u?: number | null): string {
  if (m2 === null || m2 === undefined) return '—';
  return u === undefined
    ? `${num(m2 * 1e6, 5)} mm²`
    : plusMinus(m2 * 1e6, u === null ? null : u * 1e6, 'mm²');
}

export function metres(m: number | null | undefined, digits = 3): string {
  return m === null || m === undefined ? '—' : `${num(m, digits)} m`;
}

export function mm(m: number | null | undefined): string {
  return m === null || m === undefined || !Number.isFinite(m) ? '—' : `${(m * 1000).toFixed(2)} mm`;
}

export function seconds(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  if (Math.abs(s) < 120) return `${s.toFixed(1)} s`;
  const m = Math.floor(s / 60);
  if (s < 3600) return `${s.toFixed(0)} s (${m} min ${Math.round(s - m * 60)} s)`;
  return `${s.toFixed(0)} s (${Math.floor(m / 60)} h ${m % 60} min)`;
}

export function date(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toISOString().slice(0, 10);
}

export function dateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** Clock time of a point in a log, when the log carries absolute time. */
export function clockAt(t0: string | null | undefined, s: number): string | null {
  if (!t0) return null;
  const ms = Date.parse(t0);
  return Number.isFinite(ms) ? new Date(ms + s * 1000).toISOString().slice(11, 19) + ' UTC' : null;
}

const PARAM_WORDS: Record<string, string> = {
  effectiveAreaM2: 'Effective area Cd·a',
  initialReadingM: 'Level at the window start',
  sensorZeroElevationM: 'Sensor zero above the vessel bottom',
  inflowM3S: 'Steady inflow (a passing inlet)',
  headExponent: 'Head exponent n',
};
export const paramName = (n: string) => PARAM_WORDS[n] ?? n;

/** The engine's sentences sometimes name parameters by their keys: put the words in. */
export const inWords = (message: string) =>
  message.replace(
    /\b(effectiveAreaM2|initialReadingM|sensorZeroElevationM|inflowM3S|headExponent)\b/g,
    (k) => PARAM_WORDS[k].replace(/^./, (c) => c.toLowerCase()),
  );

const TERM_WORDS: Record<string, string> = {
  inflow: 'steady inflow',
  datum: 'sensor zero',
  exponent: 'head exponent',
};
export const termName = (t: string) => TERM_WORDS[t] ?? t;

const SHAPE_WORDS: Record<string, string> = {
  'vertical-cylinder': 'Upright cylinder',
  'horizontal-cylinder': 'Cylinder lying on its side',
  rectangular: 'Rectangular tank',
  sphere: 'Sphere',
  'cone-bottom': 'Cylinder with cone bottom',
  'elliptical-head-cylinder': 'Cylinder with 2:1 dished bottom',
  table: 'Surveyed stage–area table',
};
export const shapeName = (k: string) => SHAPE_WORDS[k] ?? k;

const OUTLET_WORDS: Record<string, string> = {
  'sharp-edged': 'sharp-edged orifice',
  'square-edged-short-tube': 'short square-edged tube',
  rounded: 'rounded entry',
  nozzle: 'nozzle',
  valve: 'valve',
  other: 'other',
};
export const outletName = (k: string | null | undefined) =>
  k ? (OUTLET_WORDS[k] ?? k) : 'not stated';

/**
 * A span of days as a person says it: days under 90, months under two years, then years.
 * Local until the shared units module (server/core/format) is merged; then it should call that.
 */
export function duration(days: number | null | undefined): string {
  if (days === null || days === undefined || !Number.isFinite(days)) return '—';
  const a = Math.abs(days);
  if (a < 90) return `${Math.round(days)} day${Math.round(a) === 1 ? '' : 's'}`;
  if (a < 730) return `${Math.round(days / 30.4375)} months`;
  return `${(days / 365.25).toFixed(1)} years`;
}
