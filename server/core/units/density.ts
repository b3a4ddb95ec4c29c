import { InputError } from '../errors.js';

/*
 * Density of air-free pure water at 101.325 kPa, kg/m³.
 *
 * 0–40 °C: the CIPM-recommended formula of Tanaka, Girard, Davis, Peuto and Bignell,
 *   "Recommended table for the density of water between 0 °C and 40 °C based on recent
 *   experimental reports", Metrologia 38 (2001) 301–309, eq. (1), for SMOW on ITS-90:
 *   ρ = a5·[1 − (t + a1)²·(t + a2) / (a3·(t + a4))].
 * 40–100 °C: Kell, "Density, thermal expansivity, and compressibility of liquid water from
 *   0 °C to 150 °C", J. Chem. Eng. Data 20 (1975) 97–105, the rational-polynomial fit for
 *   1 atm (IPTS-68; the scale difference is under 0.01 K here, well inside its stated accuracy).
 *
 * Coefficients are from memory, cross-checked against independent published transcriptions;
 * the tests compare the result against the tabulated values. At the 40 °C seam the two
 * formulas differ by under 1 ppm (0.0006 kg/m³), far below what a drain test can resolve.
 * Outside 0–100 °C (ice, or boiling at 1 atm) the function refuses.
 */
const A1 = -3.983035; // °C
const A2 = 301.797; // °C
const A3 = 522528.9; // °C²
const A4 = 69.34881; // °C
const A5 = 999.97495; // kg/m³

const K0 = 999.83952;
const K1 = 16.945176;
const K2 = -7.9870401e-3;
const K3 = -46.170461e-6;
const K4 = 105.56302e-9;
const K5 = -280.54253e-12;
const KB = 16.87985e-3;

export const WATER_DENSITY_RANGE_C = { min: 0, max: 100 } as const;

export function waterDensityKgM3(temperatureC: number): number {
  const t = temperatureC;
  if (!(t >= WATER_DENSITY_RANGE_C.min && t <= WATER_DENSITY_RANGE_C.max)) {
    throw new InputError(
      `water temperature ${t} °C is outside 0–100 °C, where the density formula holds; give the density instead`,
    );
  }
  if (t <= 40) return A5 * (1 - ((t + A1) * (t + A1) * (t + A2)) / (A3 * (t + A4)));
  const num = K0 + t * (K1 + t * (K2 + t * (K3 + t * (K4 + t * K5))));
  return num / (1 + KB * t);
}
