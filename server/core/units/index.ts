export { STANDARD_GRAVITY_MS2 } from './gravity.js';
export { lengthFactorToM } from './length.js';
export { pressureFactorToPa } from './pressure.js';
export { flowFactorToM3s } from './flow.js';
export { temperatureToC, temperatureUnit, type TemperatureUnit } from './temperature.js';
export { waterDensityKgM3, WATER_DENSITY_RANGE_C } from './density.js';
export { parseFlow, parseLength } from './parse.js';
export { normaliseUnit } from './normalise.js';
export {
  formatLengthEntry,
  LENGTH_ENTRY_UNIT_NAMES,
  LENGTH_ENTRY_UNITS,
  parseLengthEntry,
  roundLengthM,
  type LengthEntryUnit,
} from './length-entry.js';
