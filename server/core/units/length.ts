import { lookUp } from './normalise.js';

// Factors to metres. The inch (0.0254 m) and foot (0.3048 m) are exact by the 1959
// international yard and pound agreement (NIST SP 811, 2008, Appendix B.8).
const INCH = 0.0254;
const FOOT = 0.3048;

const EXACT = new Map<string, number>([
  ['"', INCH],
  ["'", FOOT],
  ['\u2033', INCH], // double prime
  ['\u2032', FOOT], // prime
]);

// Length has no unit that differs from another only by case (nobody logs megametres),
// so every spelling is matched case-insensitively.
const FOLDED = new Map<string, number>();
for (const [names, f] of [
  [['m', 'metre', 'metres', 'meter', 'meters'], 1],
  [['cm', 'centimetre', 'centimetres', 'centimeter', 'centimeters'], 0.01],
  [['mm', 'millimetre', 'millimetres', 'millimeter', 'millimeters'], 0.001],
  [['in', 'inch', 'inches'], INCH],
  [['ft', 'foot', 'feet'], FOOT],
] as const) {
  for (const n of names) FOLDED.set(n, f);
}

/** Metres per one of `unit`, or null when the unit is not a length unit we know. */
export function lengthFactorToM(unit: string): number | null {
  return lookUp(unit, EXACT, FOLDED);
}
