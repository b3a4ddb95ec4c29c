/**
 * The two ways a person may choose to read results: SI (mm², L/s, m, mm) or US customary
 * (in², US gal/min, ft, in). Stored data and JSON are always SI; only text shown to a person
 * goes through here.
 */
import {
  LITRES_PER_SECOND_PER_US_GALLON_PER_MINUTE,
  METRES_PER_FOOT,
  METRES_PER_INCH,
  SQUARE_METRES_PER_SQUARE_INCH,
} from './nist-factors.js';

export const UNIT_SYSTEMS = ['si', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

/** The default when a person has chosen nothing. */
export const DEFAULT_UNIT_SYSTEM: UnitSystem = 'si';

export const isUnitSystem = (x: unknown): x is UnitSystem =>
  typeof x === 'string' && (UNIT_SYSTEMS as readonly string[]).includes(x);

/** What is shown: effective areas, flows, levels and lengths, and small lengths (residuals, bores). */
export type DisplayQuantity = 'area' | 'flow' | 'length' | 'smallLength';

export interface DisplayUnit {
  /** The unit's symbol as printed after the number. */
  symbol: string;
  /** Multiply an SI value (m², m³/s, m) by this to get the displayed number. */
  perSi: number;
}

const UNITS: Record<UnitSystem, Record<DisplayQuantity, DisplayUnit>> = {
  si: {
    area: { symbol: 'mm²', perSi: 1e6 },
    flow: { symbol: 'L/s', perSi: 1e3 },
    length: { symbol: 'm', perSi: 1 },
    smallLength: { symbol: 'mm', perSi: 1e3 },
  },
  us: {
    area: { symbol: 'in²', perSi: 1 / SQUARE_METRES_PER_SQUARE_INCH },
    flow: { symbol: 'gal/min', perSi: 1e3 / LITRES_PER_SECOND_PER_US_GALLON_PER_MINUTE },
    length: { symbol: 'ft', perSi: 1 / METRES_PER_FOOT },
    smallLength: { symbol: 'in', perSi: 1 / METRES_PER_INCH },
  },
};

export function displayUnit(
  q: DisplayQuantity,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): DisplayUnit {
  return UNITS[units][q];
}

/** The SI value in the display unit (a number, for charts and tables that print their own unit). */
export function toDisplay(
  q: DisplayQuantity,
  si: number,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): number {
  return si * UNITS[units][q].perSi;
}

/** SI → display unit for a stated SI unit symbol (as the report model and fit JSON carry them). */
export function quantityOfSiUnit(siUnit: string): DisplayQuantity | null {
  if (siUnit === 'm²') return 'area';
  if (siUnit === 'm³/s') return 'flow';
  if (siUnit === 'm') return 'length';
  return null;
}

/** Words for the choice, for a report's note and the workbench's menu. */
export const UNIT_SYSTEM_WORDS: Record<UnitSystem, string> = {
  si: 'SI (mm², L/s, m)',
  us: 'US customary (in², US gal/min, ft)',
};
