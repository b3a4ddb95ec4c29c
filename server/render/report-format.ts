/**
 * Number formatting for reports: every number a PDF prints goes through here, and here only to the
 * one formatting module (server/core/format), so the CLI, the workbench and the PDF agree digit
 * for digit. A PDF is written in the units of the person who asked for it (or `?units=`), marked
 * on the report and in its metadata (EffluxUnits) so `report verify` re-renders it the same way.
 */
export { fixedText, sig, toU } from '../core/format/digits.js';
export {
  areaText,
  flowText,
  lengthText,
  measurementText,
  smallLengthText,
  quantityText,
  uncertaintyText,
  daysText,
} from '../core/format/index.js';
import { measurementText, uncertaintyText } from '../core/format/uncertainty.js';
import { fixedText, significantText, toU } from '../core/format/digits.js';
import {
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  isUnitSystem,
  quantityOfSiUnit,
  UNIT_SYSTEM_WORDS,
  type UnitSystem,
} from '../core/format/unit-system.js';
export { DEFAULT_UNIT_SYSTEM, displayUnit, type UnitSystem };

/** The units of a report, from its metadata (reports made before the choice existed: SI). */
export const reportUnits = (info: Record<string, string | undefined> | undefined): UnitSystem =>
  isUnitSystem(info?.EffluxUnits) ? info.EffluxUnits : DEFAULT_UNIT_SYSTEM;

/** The line a report prints to say its units. */
export const unitsNote = (units: UnitSystem) =>
  `${UNIT_SYSTEM_WORDS[units]}; the attached JSON is in SI`;

/** An SI unit symbol and the factor to the display unit ("m²" → mm² or in²); others unchanged. */
export function shownUnit(siUnit: string, units: UnitSystem): { symbol: string; perSi: number } {
  const q = quantityOfSiUnit(siUnit);
  return q ? displayUnit(q, units) : { symbol: siUnit === '1' ? '' : siUnit, perSi: 1 };
}

/** "value ± U unit" in display units: the same string the CLI and the fit page print. */
export function resultText(
  value: number,
  expandedU: number | null | undefined,
  siUnit: string,
  units: UnitSystem,
): string {
  const { symbol, perSi } = shownUnit(siUnit, units);
  return measurementText(value * perSi, expandedU == null ? null : expandedU * perSi, symbol);
}

/** An uncertainty in display units, two significant digits. */
export const uText = (u: number | null | undefined, siUnit: string, units: UnitSystem) => {
  const { symbol, perSi } = shownUnit(siUnit, units);
  return uncertaintyText(u == null ? u : u * perSi, symbol);
};

/** A value to the resolution of its standard uncertainty, in display units (no unit appended). */
export const valueToU = (
  x: number | null | undefined,
  u: number | null | undefined,
  siUnit: string,
  units: UnitSystem,
) => {
  const { perSi } = shownUnit(siUnit, units);
  return toU(x == null ? x : x * perSi, u == null ? u : u * perSi);
};

/** An uncertainty in display units, two significant digits, no unit appended (table cells). */
export const uncertaintyIn = (
  u: number | null | undefined,
  siUnit: string,
  units: UnitSystem,
): string => uncertaintyText(u == null ? u : u * shownUnit(siUnit, units).perSi);

/** A number (no unit), `digits` significant digits, in the display unit of `siUnit`. */
export const numberIn = (
  x: number | null | undefined,
  siUnit: string,
  units: UnitSystem,
  digits = 4,
): string =>
  x === null || x === undefined || !Number.isFinite(x)
    ? '—'
    : significantText(x * shownUnit(siUnit, units).perSi, digits);

/** A vessel length, to the millimetre in SI (3.200 m), to a thousandth of a foot in US units. */
export const metresText = (m: number | null | undefined, units: UnitSystem) => {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—';
  const { symbol, perSi } = displayUnit('length', units);
  return `${fixedText(m * perSi, 3)} ${symbol}`;
};

/** A small length (bores, tolerances): mm to a tenth, or inches to a thousandth. */
export const millimetresText = (m: number | null | undefined, units: UnitSystem) => {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—';
  const { symbol, perSi } = displayUnit('smallLength', units);
  return `${fixedText(m * perSi, units === 'si' ? 1 : 3)} ${symbol}`;
};

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
