import { lookUp } from './normalise.js';

// US liquid gallon = 231 in³ = 3.785 411 784 × 10⁻³ m³ exactly (NIST SP 811, 2008, B.8).
const US_GALLON_M3 = 231 * 0.0254 ** 3;

const EXACT = new Map<string, number>();
const FOLDED = new Map<string, number>();
for (const [names, f] of [
  [['m3/s', 'cumecs'], 1],
  [['m3/h', 'm3/hr', 'm3/hour'], 1 / 3600],
  [['m3/min'], 1 / 60],
  [['l/s', 'lps', 'litre/s', 'liter/s', 'litres/s', 'liters/s'], 1e-3],
  [['l/min', 'lpm', 'litre/min', 'liter/min', 'litres/min', 'liters/min'], 1e-3 / 60],
  [['l/h', 'l/hr'], 1e-3 / 3600],
  [['gpm', 'usgpm', 'gal/min', 'usgal/min', 'gallon/min', 'gallons/min'], US_GALLON_M3 / 60],
] as const) {
  for (const n of names) FOLDED.set(n, f);
}

/**
 * Cubic metres per second per one of `unit`, or null when unknown. "gal" means the US
 * gallon; the imperial gallon (about 20 % larger) is deliberately not guessed at.
 */
export function flowFactorToM3s(unit: string): number | null {
  return lookUp(unit, EXACT, FOLDED);
}
