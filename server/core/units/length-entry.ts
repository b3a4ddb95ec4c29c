import { InputError } from '../errors.js';
import { lengthFactorToM } from './length.js';

/**
 * A length as a person types it into a form: a bare number in the unit chosen beside the field,
 * a number with its own unit ("35 mm", "1.2 m"), or feet and inches together as a US site writes
 * them ("7 ft 6 in", "7' 6\"", "7ft 6.5in"). Factors from length.ts (inch and foot exact, NIST
 * SP 811, 2008, Appendix B.8).
 */
export const LENGTH_ENTRY_UNITS = ['m', 'cm', 'mm', 'ft', 'in', 'ft-in'] as const;
export type LengthEntryUnit = (typeof LENGTH_ENTRY_UNITS)[number];

export const LENGTH_ENTRY_UNIT_NAMES: Record<LengthEntryUnit, string> = {
  m: 'm',
  cm: 'cm',
  mm: 'mm',
  ft: 'ft',
  in: 'in',
  'ft-in': 'ft and in',
};

const INCH_M = 0.0254;
const FOOT_M = 0.3048;
const NUMBER = String.raw`[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)`;
// "7 ft 6 in", "7' 6\"", "7ft6in", "7 feet 6 inches" (foot part first, inch part optional)
const FEET_INCHES = new RegExp(
  String.raw`^(${NUMBER})\s*(?:ft|feet|foot|'|\u2032)\s*(?:(${NUMBER})\s*(?:in|inch|inches|"|\u2033))?$`,
  'i',
);
const WITH_UNIT = new RegExp(String.raw`^(${NUMBER})\s*([^\d\s.,+-].*)$`);

const num = (s: string) => Number(s.replace(',', '.'));

/**
 * Binary conversion leaves noise in the last digits (90 × 0.0254 = 2.2859999999999996); a typed
 * length is known to far fewer than 12 significant digits, so the metres are rounded to 12.
 */
export function roundLengthM(m: number): number {
  return m === 0 ? 0 : Number(m.toPrecision(12));
}

/**
 * Metres from what was typed, or null for an empty field. `unit` is the unit chosen beside the
 * field (a bare number is read in it; "ft-in" reads a bare number as feet). Refuses anything else
 * with a message naming what was expected.
 */
export function parseLengthEntry(text: string, unit: LengthEntryUnit): number | null {
  const t = text.trim();
  if (t === '') return null;
  const fi = FEET_INCHES.exec(t);
  if (fi) {
    const feet = num(fi[1]);
    const inches = fi[2] === undefined ? 0 : num(fi[2]);
    if (inches < 0 || inches >= 12)
      throw new InputError(`"${t}": the inches of feet and inches run from 0 to under 12`);
    // in inches first, so whole inches stay exact before the one multiplication
    return roundLengthM((feet * 12 + (feet < 0 ? -inches : inches)) * INCH_M);
  }
  if (new RegExp(`^${NUMBER}$`).test(t)) {
    const v = num(t);
    return roundLengthM(v * (unit === 'ft-in' ? FOOT_M : (lengthFactorToM(unit) as number)));
  }
  const wu = WITH_UNIT.exec(t);
  if (wu) {
    const f = lengthFactorToM(wu[2]);
    if (f === null) throw new InputError(`"${wu[2]}" is not a length unit (m, cm, mm, ft, in)`);
    return roundLengthM(num(wu[1]) * f);
  }
  throw new InputError(`cannot read "${t}" as a length (e.g. 1.8, 1.8 m, 450 mm or 7 ft 6 in)`);
}

/**
 * A length in metres written in `unit` for the form: 15 significant digits at most (so it reads back
 * to the same metres after parseLengthEntry's rounding to 12), trailing zeros and noise dropped.
 */
export function formatLengthEntry(m: number, unit: LengthEntryUnit): string {
  const plain = (x: number) => {
    const r = Number(x.toPrecision(15));
    return Math.abs(r) >= 1e-6 || r === 0 ? String(r) : r.toFixed(15).replace(/0+$/, '');
  };
  if (unit === 'ft-in') {
    const inchesTotal = Number((Math.abs(m) / INCH_M).toPrecision(15));
    const feet = Math.floor(inchesTotal / 12);
    const inches = Number((inchesTotal - feet * 12).toPrecision(13));
    const sign = m < 0 ? '-' : '';
    return inches === 0 ? `${sign}${feet} ft` : `${sign}${feet} ft ${plain(inches)} in`;
  }
  return plain(m / (lengthFactorToM(unit) as number));
}
