/**
 * Numbers for people in the workbench: a thin adapter of the one formatting module
 * (server/core/format, bundled), holding the signed-in person's choice of units. Every page
 * formats through here, so the units follow the person's preference everywhere.
 */
import {
  DEFAULT_UNIT_SYSTEM,
  decimalsForSignificant,
  displayUnit,
  durationText,
  measurementText,
  plainText,
  quantityText,
  smallLengthText,
  type DisplayQuantity,
  type UnitSystem,
} from '../../server/core/format/index.js';

export type { UnitSystem } from '../../server/core/format/index.js';
export {
  daysText,
  durationText,
  countText,
  clipText,
  UNIT_SYSTEM_WORDS,
} from '../../server/core/format/index.js';

let units: UnitSystem = DEFAULT_UNIT_SYSTEM;

/** The signed-in person's preference (main.ts sets it from GET /api/session). */
export function setDisplayUnits(u: UnitSystem | null | undefined): void {
  units = u ?? DEFAULT_UNIT_SYSTEM;
}
export const displayUnits = (): UnitSystem => units;

/** The unit a quantity is shown in, and the factor from SI (for charts and tables). */
export const unitOf = (q: DisplayQuantity) => displayUnit(q, units);

/** Inputs and diagnostics: `digits` significant digits, no exponent for ordinary magnitudes. */
export function num(x: number | null | undefined, digits = 3): string {
  return plainText(x, Math.max(1, digits));
}

/** Digits after the point so the uncertainty shows two significant figures (JCGM 100 §7.2.6). */
export function decimalsFor(u: number): number {
  if (!(u > 0) || !Number.isFinite(u)) return 3;
  return Math.min(8, Math.max(0, decimalsForSignificant(u, 2)));
}

/** "0.6120 ± 0.0055" with the value rounded to the uncertainty's last digit. */
export function plusMinus(
  value: number | null | undefined,
  u: number | null | undefined,
  unit = '',
): string {
  return measurementText(value, u, unit);
}

/**
 * A quantity in the person's unit: with an uncertainty, value ± U (JCGM 100 §7.2.6 digits, zeros
 * kept); without one it is an input or a threshold, so `digits` significant digits, zeros dropped.
 */
function shownQuantity(
  q: DisplayQuantity,
  si: number | null | undefined,
  U: number | null | undefined,
  digits: number,
): string {
  if (U !== undefined) return quantityText(q, si, U, units);
  if (si === null || si === undefined || !Number.isFinite(si)) return '—';
  const { symbol, perSi } = displayUnit(q, units);
  return `${plainText(si * perSi, digits)} ${symbol}`;
}

/** Cd·a in the person's unit (mm² or in²), with its expanded uncertainty when given. */
export function area(m2: number | null | undefined, U?: number | null): string {
  return shownQuantity('area', m2, U, 5);
}
/** Kept for the pages that call it by its old name: in the person's unit, not always mm². */
export const areaMm2 = area;

/** A flow in L/s or US gal/min. */
export const flow = (m3s: number | null | undefined, U?: number | null) =>
  shownQuantity('flow', m3s, U, 4);

/** A level or length in m or ft. */
export function metres(m: number | null | undefined, digits = 3): string {
  return shownQuantity('length', m, undefined, digits);
}

/** A small length (residuals) in mm or in. */
export function mm(m: number | null | undefined): string {
  return smallLengthText(m, undefined, units);
}

export function seconds(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  if (Math.abs(s) < 120) return `${s.toFixed(1)} s`;
  return `${s.toFixed(0)} s (${durationText(s)})`;
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
