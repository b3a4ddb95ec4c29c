/**
 * Two results of one measurand compared as interlaboratory comparisons do (ISO/IEC 17043:2010,
 * Annex B, the E_n number): E_n = (x₁ − x₂) / U_diff with U_diff the expanded uncertainty of the
 * difference. For two independent tests U_diff = √(U₁² + U₂²), U₁ and U₂ expanded uncertainties
 * at the same coverage (about 95 %). |E_n| ≤ 1: the two agree within their uncertainties;
 * |E_n| > 1: the difference is significant.
 */

export interface MeasuredValue {
  value: number;
  /** Expanded uncertainty U (about 95 %), same unit as value. */
  expandedUncertainty: number;
}

export interface EnComparison {
  /** x₁ − x₂ */
  difference: number;
  /** √(U₁² + U₂²) */
  expandedUncertaintyOfDifference: number;
  /** (x₁ − x₂) / U_diff, signed; compare |E_n| with 1. */
  en: number;
  /** |E_n| ≤ 1 */
  agree: boolean;
}

/** U_diff of two independent results from their expanded uncertainties. */
export function expandedUncertaintyOfDifference(U1: number, U2: number): number {
  return Math.hypot(U1, U2);
}

/** E_n of two independent results; null when either uncertainty is missing or both are zero. */
export function compareEn(a: MeasuredValue, b: MeasuredValue): EnComparison | null {
  const ok = (u: number) => Number.isFinite(u) && u >= 0;
  if (!Number.isFinite(a.value) || !Number.isFinite(b.value)) return null;
  if (!ok(a.expandedUncertainty) || !ok(b.expandedUncertainty)) return null;
  const Ud = expandedUncertaintyOfDifference(a.expandedUncertainty, b.expandedUncertainty);
  if (!(Ud > 0)) return null;
  const difference = a.value - b.value;
  const en = difference / Ud;
  return { difference, expandedUncertaintyOfDifference: Ud, en, agree: Math.abs(en) <= 1 };
}
