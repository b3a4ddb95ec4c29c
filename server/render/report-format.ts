/**
 * Number formatting for reports: every number a PDF prints goes through here, and here only to the
 * one formatting module (server/core/format), so the CLI, the workbench and the PDF agree digit
 * for digit. A PDF is written in the units of the person who asked for it (or `?units=`), marked
 * on the report and in its metadata (EffluxUnits) so `report verify` re-renders it the same way.
 */
export { sig, toU } from '../core/format/digits.js';
export {
  areaText,
  flowText,
  lengthText,
  measurementText,
  smallLengthText,
  uncertaintyText,
  daysText,
} from '../core/format/index.js';
import { measurementText, uncertaintyText } from '../core/format/uncertainty.js';
import { toU } from '../core/format/digits.js';
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

export const bytesText = (n: number) =>
  n < 1024
    ? `${n} B`
    : n < 1048576
      ? `${(n / 1024).toFixed(1)} KiB`
      : `${(n / 1048576).toFixed(2)} MiB`;

export const dateText = (iso: string | null | undefined) =>
  iso ? iso.replace('T', ' ').replace(/\.000Z$|Z$/, ' UTC') : '—';
