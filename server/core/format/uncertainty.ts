/**
 * A result with its expanded uncertainty, written as JCGM 100:2008 §7.2.6 asks: the uncertainty
 * to two significant digits (rounded to nearest; §7.2.6 allows rounding up, which we do not), the
 * value rounded to the same decimal place, trailing zeros kept: "0.612 ± 0.011", "397.6 ± 4.3 mm²".
 */
import { decimalsForSignificant, fixedText, significantText } from './digits.js';

/** Significant digits of an uncertainty as printed (JCGM 100:2008 §7.2.6: "at most two"). */
export const UNCERTAINTY_DIGITS = 2;

export interface MeasurementDigits {
  value: string;
  /** The expanded uncertainty, or null when there is none. */
  uncertainty: string | null;
  /** Decimal places both were rounded to (negative: to tens, hundreds…). */
  decimals: number;
}

/** The value and its uncertainty rounded alike; without an uncertainty, 6 significant digits. */
export function measurementDigits(
  value: number,
  uncertainty: number | null | undefined,
): MeasurementDigits {
  if (
    uncertainty === null ||
    uncertainty === undefined ||
    !(uncertainty > 0) ||
    !Number.isFinite(uncertainty)
  ) {
    const text = significantText(value, 6);
    const dot = text.indexOf('.');
    return { value: text, uncertainty: null, decimals: dot < 0 ? 0 : text.length - dot - 1 };
  }
  const decimals = decimalsForSignificant(uncertainty, UNCERTAINTY_DIGITS);
  return {
    value: fixedText(value, decimals),
    uncertainty: fixedText(uncertainty, decimals),
    decimals,
  };
}

/** "0.612 ± 0.011" (with " unit" when given); "—" for a missing value. */
export function measurementText(
  value: number | null | undefined,
  uncertainty: number | null | undefined,
  unit = '',
): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const d = measurementDigits(value, uncertainty);
  const tail = unit ? ` ${unit}` : '';
  return d.uncertainty === null ? `${d.value}${tail}` : `${d.value} ± ${d.uncertainty}${tail}`;
}

/** An uncertainty alone, to two significant digits ("0.0055"). */
export function uncertaintyText(u: number | null | undefined, unit = ''): string {
  if (u === null || u === undefined || !Number.isFinite(u)) return '—';
  return `${u > 0 ? fixedText(u, decimalsForSignificant(u, UNCERTAINTY_DIGITS)) : '0'}${unit ? ` ${unit}` : ''}`;
}
