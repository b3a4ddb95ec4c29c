import { STANDARD_GRAVITY_MS2 } from './gravity.js';
import { lookUp } from './normalise.js';

/*
 * Liquid-column units use the *conventional* definitions (NIST SP 811, 2008, Appendix B.8,
 * entries marked "conventional"): a column of density 1000 kg/m³ for water and 13 595.1 kg/m³
 * for mercury, under standard gravity 9.806 65 m/s². So 1 mmH2O = 9.806 65 Pa exactly and
 * 1 mmHg = 133.322 387 415 Pa. The temperature-specific columns (water at 4 °C, 39.2 °F or
 * 60 °F; mercury at 0 °C or 60 °F) differ by up to about 0.1 % and are not offered: a
 * transducer labelled "inH2O" is, in practice, calibrated to the conventional unit.
 */
const WATER_COLUMN_PA_PER_M = 1000 * STANDARD_GRAVITY_MS2;
const MERCURY_COLUMN_PA_PER_M = 13595.1 * STANDARD_GRAVITY_MS2;
const INCH_M = 0.0254;
// Pound-force per square inch: 0.453 592 37 kg × 9.806 65 m/s² / (0.0254 m)², exact by definition.
const PSI_PA = (0.45359237 * STANDARD_GRAVITY_MS2) / (INCH_M * INCH_M);

// Case matters for the SI prefixes (mPa is not MPa, mbar is not Mbar), so these are exact.
const EXACT = new Map<string, number>([
  ['Pa', 1],
  ['kPa', 1e3],
  ['hPa', 1e2],
  ['MPa', 1e6],
  ['bar', 1e5],
  ['mbar', 1e2],
]);

const FOLDED = new Map<string, number>();
for (const [names, f] of [
  [['pa', 'pascal', 'pascals'], 1],
  [['kpa', 'kilopascal', 'kilopascals'], 1e3],
  [['hpa', 'hectopascal', 'hectopascals'], 1e2],
  [['bar', 'bars'], 1e5],
  [['mbar', 'millibar', 'millibars', 'mb'], 1e2],
  // psig and psia name gauge or absolute reference; the factor is the same and which
  // reference applies is decided where the column is read.
  [['psi', 'psig', 'psia', 'lbf/in2'], PSI_PA],
  [
    ['inh2o', 'inwc', 'inwg', '"h2o', '"wc', 'inchh2o', 'incheswc', 'inchesh2o', 'inofwater'],
    INCH_M * WATER_COLUMN_PA_PER_M,
  ],
  [['cmh2o', 'cmwc', 'cmwg'], 0.01 * WATER_COLUMN_PA_PER_M],
  [['mmh2o', 'mmwc', 'mmwg'], 0.001 * WATER_COLUMN_PA_PER_M],
  [['mh2o', 'mwc', 'mwg'], WATER_COLUMN_PA_PER_M],
  [['mmhg', 'torr'], 0.001 * MERCURY_COLUMN_PA_PER_M],
  [['inhg'], INCH_M * MERCURY_COLUMN_PA_PER_M],
] as const) {
  for (const n of names) FOLDED.set(n, f);
}

/** Pascals per one of `unit`, or null when the unit is not a pressure unit we know. */
export function pressureFactorToPa(unit: string): number | null {
  return lookUp(unit, EXACT, FOLDED);
}
