import type { ApprovedFit, Epoch } from './types.js';
import { weightedLine, type WeightedLine } from './line.js';

/** Julian year: the time axis of every trend line is years since the epoch's baseline test. */
export const YEAR_MS = 365.25 * 86_400_000;
export const DAY_MS = 86_400_000;

export type TrendQuantity = 'effectiveArea' | 'dischargeCoefficient';

export interface TrendLine {
  quantity: TrendQuantity;
  /** t = 0 of the line: the baseline test's time. */
  originMs: number;
  /** The baseline test's value (the reference of every percentage). */
  baselineValue: number;
  fit: WeightedLine;
  slopePerYear: number;
  slopePerYearU: number;
  slopePerYearInterval95: { lower: number; upper: number };
  /**
   * Slope in % of the baseline per year. The baseline is taken as exact here: its own scatter is
   * already part of the line, and the percentage is a unit, not a new estimate.
   */
  slopePctPerYear: number;
  slopePctPerYearU: number;
  slopePctPerYearInterval95: { lower: number; upper: number };
}

export function yearsSince(originMs: number, ms: number): number {
  return (ms - originMs) / YEAR_MS;
}

function quantityValue(f: ApprovedFit, q: TrendQuantity): number {
  return q === 'effectiveArea' ? f.effectiveAreaM2 : f.dischargeCoefficient;
}

function uncertaintyOf(f: ApprovedFit, q: TrendQuantity): number {
  return q === 'effectiveArea' ? f.effectiveAreaU : f.dischargeCoefficientU;
}

/** The epoch's trend line for one quantity, or null with fewer than 3 tests (no degree of freedom). */
export function epochLine(epoch: Epoch, quantity: TrendQuantity): TrendLine | null {
  const fits = epoch.fits;
  if (fits.length < 3 || !epoch.baseline) return null;
  const origin = epoch.baseline.testedAtMs;
  const n = fits.length;
  const t = new Float64Array(n),
    y = new Float64Array(n),
    u = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = yearsSince(origin, fits[i].testedAtMs);
    y[i] = quantityValue(fits[i], quantity);
    u[i] = uncertaintyOf(fits[i], quantity);
  }
  const fit = weightedLine(t, y, u);
  const base = quantityValue(epoch.baseline, quantity);
  const pct = 100 / base;
  return {
    quantity,
    originMs: origin,
    baselineValue: base,
    fit,
    slopePerYear: fit.slope,
    slopePerYearU: fit.uSlope,
    slopePerYearInterval95: fit.slopeInterval95,
    slopePctPerYear: fit.slope * pct,
    slopePctPerYearU: fit.uSlope * pct,
    slopePctPerYearInterval95: {
      lower: fit.slopeInterval95.lower * pct,
      upper: fit.slopeInterval95.upper * pct,
    },
  };
}
