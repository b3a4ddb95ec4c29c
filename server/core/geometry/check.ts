import { InputError } from '../errors.js';

/** A dimension must be a finite positive number; the field path names it for the person. */
export function positive(value: number, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new InputError(`must be a positive number (got ${String(value)})`, {
      field: `shape.${field}`,
    });
  }
  return value;
}

/** An optional interior height: absent means no top (Infinity); present, it must cover `atLeast`. */
export function heightOrOpen(value: number | undefined, atLeast: number, what: string): number {
  if (value === undefined) return Number.POSITIVE_INFINITY;
  positive(value, 'heightM');
  if (value < atLeast) {
    throw new InputError(`must be at least ${what} (${atLeast} m) (got ${value})`, {
      field: 'shape.heightM',
    });
  }
  return value;
}

/**
 * Every shape treats a height outside [0, heightM] as the nearest end: below the bottom is
 * empty, above the top is full. Solvers that step a hair past either end then see finite,
 * continuous numbers instead of NaN from a square root of a negative number.
 */
export function clampHeight(y: number, heightM: number): number {
  return y < 0 ? 0 : y > heightM ? heightM : y;
}
