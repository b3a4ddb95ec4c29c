import { InputError } from '../errors.js';
import { flowFactorToM3s } from './flow.js';
import { lengthFactorToM } from './length.js';

// A number (decimal point or a lone decimal comma, optional exponent) followed by a unit.
const QUANTITY = /^\s*([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$/;

function parseQuantity(
  text: string,
  what: string,
  factor: (unit: string) => number | null,
  examples: string,
): number {
  const m = QUANTITY.exec(text);
  if (!m) throw new InputError(`cannot read "${text}" as a ${what} (expected e.g. ${examples})`);
  const value = Number(m[1].replace(',', '.'));
  const unit = m[2];
  if (unit === '')
    throw new InputError(`"${text}" has no unit; a ${what} needs one (e.g. ${examples})`);
  const f = factor(unit);
  if (f === null) throw new InputError(`unknown ${what} unit "${unit}" in "${text}"`);
  return value * f;
}

/** A flow written with its unit ("2.5L/s", "9 m3/h", "40 gpm") in m³/s. A bare number is refused. */
export function parseFlow(text: string): number {
  return parseQuantity(text, 'flow', flowFactorToM3s, '"2.5 L/s", "9 m3/h" or "40 gpm"');
}

/** A length written with its unit ("1.2 m", "35mm", "6 in", "4'") in metres. A bare number is refused. */
export function parseLength(text: string): number {
  return parseQuantity(text, 'length', lengthFactorToM, '"1.2 m", "35 mm" or "6 in"');
}
