import type { TargetQuantity } from './schema.js';

/** What the planner answers (server/core/plan/plan.ts): the shape of `efflux plan --json`. */
export interface UncertaintyLine {
  name: string;
  /** Relative standard uncertainty contribution. */
  relative: number;
  applies: 'effective-area' | 'discharge-coefficient';
  kind: 'A' | 'B';
}

export interface PlannedTest {
  startLevelM: number;
  /** Level at which logging stops. */
  endLevelM: number;
  startHeadM: number;
  /** Valve opening to the end of logging, s. */
  durationS: number;
  /** The fit's window, s after the valve opens, and its last level. */
  windowStartS: number;
  windowEndS: number;
  windowEndLevelM: number;
  samplesInWindow: number;
  effectiveSamples: number;
  drainTimeToEndS: number;
  /** Time to drain to the outlet at the expected Cd, and at the low and high ends of the usual band. */
  drainTimeToOutletS: number;
  drainTimeToEndBandS: [number, number];
  volumeDischargedM3: number;
  peakOutflowLS: number;
  effectiveAreaM2: number;
  uncertainty: {
    lines: UncertaintyLine[];
    typeARelative: number;
    effectiveAreaRelative: number;
    effectiveAreaStandardM2: number;
    dischargeCoefficientRelative: number;
    dischargeCoefficientStandard: number;
  };
  timesToLevels: { levelM: number; timeS: number | null }[];
  curve: { timeS: number[]; levelM: number[]; outflowLS: number[] };
}

export interface PlanResult {
  vessel: { name: string; site: string | null };
  assumptions: {
    expectedCd: number;
    expectedCdSource: string;
    usualCdBand: [number, number];
    nominalAreaM2: number;
    effectiveAreaM2: number;
    gravityMS2: number;
    sensorZeroElevationM: number;
    datumFitted: boolean;
    outletLevelM: number;
    maxStartLevelM: number;
    openingTrimS: number;
    headFraction: number;
    sampleIntervalS: number;
    noiseM: number;
    resolutionM: number;
    noiseLag1: number;
    readingVarianceM2: number;
    lag1SeenByFit: number;
    varianceInflation: number;
  };
  test: PlannedTest | null;
  target: {
    quantity: TargetQuantity;
    relative: number;
    met: boolean | null;
    possible: boolean;
    typeBFloorRelative: number;
    /** The largest type A the target leaves room for. */
    typeAAllowedRelative: number | null;
    reason: string;
  } | null;
  recommendation: {
    shortest: PlannedTest | null;
    lowestStart: PlannedTest | null;
    /** When even a full test from the highest fill misses: the sample interval that would meet it (same noise per sample), or null. */
    sampleIntervalNeededS: number | null;
  } | null;
  discharge: {
    peakOutflowLS: number | null;
    limitLS: number | null;
    withinLimit: boolean | null;
    highestStartWithinLimitM: number | null;
    message: string | null;
  };
  cautions: readonly string[];
  notes: string[];
}
