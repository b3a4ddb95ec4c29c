import { tQuantile } from '../stats/index.js';

/**
 * From effective area to discharge coefficient, in the vocabulary of JCGM 100:2008 (GUM):
 *   Cd = Cd·a / (π·d²/4),  u_r(Cd)² = u_r(Cd·a)² + (2·u_r(d))².
 * The bore tolerance ±T is read as a rectangular distribution (GUM 4.3.7), u(d) = T/√3, with
 * infinite degrees of freedom; the effective degrees of freedom follow Welch–Satterthwaite
 * (GUM G.4.1) and the coverage factor is the Student-t 97.5 % quantile at them.
 */
export interface GumQuantity {
  value: number;
  standardUncertainty: number;
  relativeStandardUncertainty: number;
  effectiveDegreesOfFreedom: number;
  coverageFactor: number;
  expandedUncertainty: number;
  ci95: [number, number];
}

export function nominalAreaM2(boreM: number): number {
  return (Math.PI * boreM * boreM) / 4;
}

export function effectiveAreaQuantity(value: number, u: number, dof: number): GumQuantity {
  const k = tQuantile(0.975, dof);
  return {
    value,
    standardUncertainty: u,
    relativeStandardUncertainty: value !== 0 ? u / Math.abs(value) : NaN,
    effectiveDegreesOfFreedom: dof,
    coverageFactor: k,
    expandedUncertainty: k * u,
    ci95: [value - k * u, value + k * u],
  };
}

export function dischargeCoefficientQuantity(
  effectiveArea: number,
  uEffectiveArea: number,
  dofEffectiveArea: number,
  boreM: number,
  boreToleranceM: number,
): GumQuantity & { boreContribution: number; fitContribution: number } {
  const cd = effectiveArea / nominalAreaM2(boreM);
  const urFit = uEffectiveArea / effectiveArea;
  const urBore = (2 * (boreToleranceM / Math.sqrt(3))) / boreM;
  const ur = Math.hypot(urFit, urBore);
  const u = ur * cd;
  const fitContribution = urFit * cd;
  const boreContribution = urBore * cd;
  // Welch–Satterthwaite with ν = ∞ for the rectangular bore term
  const nu = fitContribution > 0 ? u ** 4 / (fitContribution ** 4 / dofEffectiveArea) : Infinity;
  const nuUsed = Math.min(nu, 1e7);
  const k = tQuantile(0.975, nuUsed);
  return {
    value: cd,
    standardUncertainty: u,
    relativeStandardUncertainty: ur,
    effectiveDegreesOfFreedom: nuUsed,
    coverageFactor: k,
    expandedUncertainty: k * u,
    ci95: [cd - k * u, cd + k * u],
    boreContribution,
    fitContribution,
  };
}

/**
 * The usual band of Cd for a free-discharging outlet of each declared type. Common practice
 * (no published source): sharp-edged orifices about 0.6–0.7; the others from memory of textbook
 * values (short tube ≈ 0.8, rounded ≈ 0.9–0.98). With no type, 0.5–1.0: outside that, suspect
 * the data, the geometry or the bore.
 */
export const USUAL_CD_BAND: Record<string, [number, number]> = {
  'sharp-edged': [0.58, 0.72],
  'square-edged-short-tube': [0.72, 0.88],
  rounded: [0.85, 1.0],
  nozzle: [0.9, 1.0],
  valve: [0.2, 1.0],
  other: [0.5, 1.0],
};
