/** `--units si|us`: the units the text output is written in (JSON stays SI). */
import { InputError } from '../core/errors.js';
import { DEFAULT_UNIT_SYSTEM, isUnitSystem, type UnitSystem } from '../core/format/unit-system.js';

export const UNITS_HELP =
  '--units si|us          units of the text: si (mm², L/s, m; the default) or us (in², US gal/min, ft); JSON stays SI';

export function unitsFrom(value: string | boolean | undefined): UnitSystem {
  if (value === undefined || value === false) return DEFAULT_UNIT_SYSTEM;
  if (isUnitSystem(value)) return value;
  throw new InputError(`--units must be si or us (got "${String(value)}")`, { field: 'units' });
}
