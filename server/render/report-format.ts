/**
 * Number formatting for reports: every number a PDF prints goes through this file, so the value
 * formats come from one place (core's sig/toU today, the shared units module when it lands) and the
 * CLI and the PDF agree. Display units: Cd·a in mm², flows in L/s, lengths in m (mm for bores).
 */
import { sig, toU } from '../core/analysis/format.js';

export { sig, toU };

export const bytesText = (n: number) =>
  n < 1024
    ? `${n} B`
    : n < 1048576
      ? `${(n / 1024).toFixed(1)} KiB`
      : `${(n / 1048576).toFixed(2)} MiB`;

export const dateText = (iso: string | null | undefined) =>
  iso ? iso.replace('T', ' ').replace(/\.000Z$|Z$/, ' UTC') : '—';

/** The day of a time in ms, ISO 8601 (UTC). */
export const dayText = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** SI unit of a stored value → the unit a reader is shown, and the factor between them. */
const DISPLAY: Record<string, { unit: string; factor: number }> = {
  'm²': { unit: 'mm²', factor: 1e6 },
  'm³/s': { unit: 'L/s', factor: 1e3 },
};

/** The display unit and factor for an SI unit ('1' shows as no unit). */
export function displayUnit(siUnit: string): { unit: string; factor: number } {
  return DISPLAY[siUnit] ?? { unit: siUnit === '1' ? '' : siUnit, factor: 1 };
}

const scaled = (x: number | null | undefined, f: number) =>
  x === null || x === undefined ? x : x * f;

/** A value at the resolution of its uncertainty, in the display unit of `siUnit` (unit not appended). */
export const valueIn = (
  x: number | null | undefined,
  u: number | null | undefined,
  siUnit: string,
): string => {
  const { factor } = displayUnit(siUnit);
  return toU(scaled(x, factor), scaled(u, factor));
};

/**
 * An uncertainty, two significant digits kept (0.00010, not 1.0e-4 nor 0.0001), in the display unit
 * of `siUnit`; exponent notation only for extreme magnitudes.
 */
export const uncertaintyIn = (u: number | null | undefined, siUnit: string): string => {
  const v = scaled(u, displayUnit(siUnit).factor);
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  if (a === 0) return '0';
  if (a >= 1e-6 && a < 10) return v.toPrecision(2);
  if (a >= 10 && a < 1e5) return String(Number(v.toPrecision(2)));
  return sig(v, 2);
};

/** A number (no unit), `digits` significant digits, in the display unit of `siUnit`. */
export const numberIn = (x: number | null | undefined, siUnit: string, digits = 4): string =>
  sig(scaled(x, displayUnit(siUnit).factor), digits);

/** A value and its unit, `digits` significant digits, in the display unit. */
export const quantityText = (x: number | null | undefined, siUnit: string, digits = 4): string => {
  const { unit, factor } = displayUnit(siUnit);
  const v = sig(scaled(x, factor), digits);
  return v === '—' || !unit ? v : `${v} ${unit}`;
};

/** A vessel length (m, to the millimetre): 3.200 m. */
export const metresText = (m: number | null | undefined) =>
  m === null || m === undefined || !Number.isFinite(m) ? '—' : `${m.toFixed(3)} m`;

/** A small length (bores, tolerances) in mm to a tenth: 50.0 mm, 0.2 mm. */
export const millimetresText = (m: number | null | undefined) =>
  m === null || m === undefined || !Number.isFinite(m) ? '—' : `${(m * 1000).toFixed(1)} mm`;

/** Cd·a in mm² at the resolution of its uncertainty, with the unit. */
export const areaText = (m2: number | null | undefined, u?: number | null) =>
  m2 === null || m2 === undefined ? '—' : `${valueIn(m2, u ?? null, 'm²')} mm²`;

/** A flow in L/s at the resolution of its uncertainty, with the unit. */
export const flowText = (m3s: number | null | undefined, u?: number | null) =>
  m3s === null || m3s === undefined ? '—' : `${valueIn(m3s, u ?? null, 'm³/s')} L/s`;

/** A fixed number of decimals (correlations, percentages shown to a stated resolution). */
export const fixedText = (x: number | null | undefined, decimals: number) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(decimals);

/** A count of days as a reader says it: days under 90, then months, then years. */
export function durationText(days: number | null | undefined): string {
  if (days === null || days === undefined || !Number.isFinite(days)) return '—';
  const a = Math.abs(days);
  if (a < 90) return `${Math.round(days)} days`;
  if (a < 730) return `${Math.round(days / 30.4375)} months`;
  return `${(days / 365.25).toFixed(1)} years`;
}

/** Axis tick labels: as few digits as tell the ticks apart, never exponent notation for ordinary magnitudes. */
export function tickText(ticks: number[]): (v: number) => string {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : Math.abs(ticks[0] || 1);
  // the fewest decimals that write the step exactly (0.005 → 3, 2.5 → 1, 20 → 0)
  let decimals = 0;
  while (decimals < 10) {
    const scaledStep = step * 10 ** decimals;
    if (Math.abs(scaledStep - Math.round(scaledStep)) <= 1e-6 * scaledStep) break;
    decimals++;
  }
  return (v: number) => (Math.abs(v) < step / 1e6 ? 0 : v).toFixed(decimals);
}
