import { InputError } from '../errors.js';
import { normaliseUnit } from './normalise.js';

export type TemperatureUnit = 'C' | 'F' | 'K';

const NAMES = new Map<string, TemperatureUnit>();
for (const [names, u] of [
  [['c', '°c', 'degc', 'deg.c', 'celsius', 'degreesc', 'degreec', '\u2103'], 'C'],
  [['f', '°f', 'degf', 'deg.f', 'fahrenheit', 'degreesf', 'degreef', '\u2109'], 'F'],
  [['k', '°k', 'kelvin', 'kelvins'], 'K'],
] as const) {
  for (const n of names) NAMES.set(n, u);
}

/** Which temperature scale a unit spelling names, or null when it names none. */
export function temperatureUnit(unit: string): TemperatureUnit | null {
  return NAMES.get(normaliseUnit(unit).toLowerCase().replace(/^º/, '°')) ?? null;
}

/**
 * A temperature in °C. t/°C = (t/°F − 32)/1.8 and t/°C = T/K − 273.15 (NIST SP 811, 2008,
 * B.9 and 4.2.1.1). Refuses an unknown unit and anything below absolute zero.
 */
export function temperatureToC(value: number, unit: string): number {
  const u = temperatureUnit(unit);
  if (u === null) throw new InputError(`unknown temperature unit "${unit}" (use C, F or K)`);
  if (!Number.isFinite(value))
    throw new InputError(`temperature is not a finite number (got ${value})`);
  const c = u === 'C' ? value : u === 'F' ? (value - 32) / 1.8 : value - 273.15;
  if (c < -273.15) throw new InputError(`temperature ${value} ${unit} is below absolute zero`);
  return c;
}
