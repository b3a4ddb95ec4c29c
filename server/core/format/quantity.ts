/**
 * SI values written in the person's units: Cd·a in mm² (in²), flows in L/s (US gal/min), levels
 * and lengths in m (ft), small lengths in mm (in). With an uncertainty, the JCGM 100 §7.2.6 digits
 * of uncertainty.ts; without one, `digits` significant digits (trailing zeros kept).
 */
import { significantText } from './digits.js';
import { measurementText } from './uncertainty.js';
import {
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  type DisplayQuantity,
  type UnitSystem,
} from './unit-system.js';

/** Default significant digits of a value shown without its uncertainty (inputs, thresholds). */
export const PLAIN_DIGITS = 4;

export function quantityText(
  q: DisplayQuantity,
  si: number | null | undefined,
  uncertaintySi?: number | null,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
  digits = PLAIN_DIGITS,
): string {
  if (si === null || si === undefined || !Number.isFinite(si)) return '—';
  const { symbol, perSi } = displayUnit(q, units);
  if (uncertaintySi === undefined) return `${significantText(si * perSi, digits)} ${symbol}`;
  return measurementText(si * perSi, uncertaintySi === null ? null : uncertaintySi * perSi, symbol);
}

/** Cd·a (m²) as mm² or in². */
export const areaText = (m2: number | null | undefined, U?: number | null, units?: UnitSystem) =>
  quantityText('area', m2, U, units);

/** A flow (m³/s) as L/s or US gal/min. */
export const flowText = (m3s: number | null | undefined, U?: number | null, units?: UnitSystem) =>
  quantityText('flow', m3s, U, units);

/** A level or length (m) as m or ft. */
export const lengthText = (m: number | null | undefined, U?: number | null, units?: UnitSystem) =>
  quantityText('length', m, U, units);

/** A small length (m): residuals, bores, as mm or in. */
export const smallLengthText = (
  m: number | null | undefined,
  U?: number | null,
  units?: UnitSystem,
) => quantityText('smallLength', m, U, units);
