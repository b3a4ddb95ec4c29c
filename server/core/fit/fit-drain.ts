import { residualDiagnostics } from '../stats/index.js';
import { createSolveWorkspace } from '../lsq/index.js';
import { THETA, THETA_NAMES, type DrainSetting } from '../drain/parameters.js';
import type { SolveResult } from '../lsq/types.js';
import {
  dischargeCoefficientQuantity,
  effectiveAreaQuantity,
  nominalAreaM2,
  type GumQuantity,
} from './coefficient.js';
import { compareModels, type ModelComparison } from './compare.js';
import { headBands, type HeadBand } from './head-bands.js';
import { profileIntervalEffectiveArea, type ProfileInterval } from './profile.js';
import { refineStartOnSubsample, startTheta } from './start-values.js';
import type { ModelTerms } from './terms.js';
import { uncertaintyFor, type UncertaintyModel } from './uncertainty.js';
import { fitVariant, type FittedVariant } from './variant.js';
import { fitWarnings, type FitWarning } from './warnings.js';

export interface OutletForFit {
  boreM: number;
  boreToleranceM?: number;
  type?: string;
}

export interface DrainFitInput {
  setting: DrainSetting;
  /** Seconds from the window's start, ascending: only the samples that take part. */
  timeS: Float64Array;
  levelM: Float64Array;
  /** The sensor zero's elevation when known; null when it must be fitted. */
  knownSensorZeroM: number | null;
  terms: ModelTerms;
  outlet: OutletForFit;
  /** Skip the slower extras (profile interval, model comparison, head bands). */
  essentialsOnly?: boolean;
  /** A clock for the timing record only (the computation never reads it). */
  now?: () => number;
}

export interface ParameterEstimate {
  name: string;
  unit: string;
  free: boolean;
  value: number;
  /** Corrected standard uncertainty (0 for fixed parameters). */
  standardUncertainty: number;
  ci95: [number, number] | null;
  start: number;
  atBound: boolean;
}

export interface DrainFitResult {
  variant: FittedVariant;
  solver: SolveResult;
  uncertainty: UncertaintyModel;
  parameters: ParameterEstimate[];
  effectiveArea: GumQuantity & {
    profileCi95: [number, number] | null;
    profile: ProfileInterval | null;
  };
  dischargeCoefficient: ReturnType<typeof dischargeCoefficientQuantity>;
  nominalAreaM2: number;
  residuals: {
    samples: number;
    rmseM: number;
    maxAbsM: number;
    lag1Autocorrelation: number;
    durbinWatson: number;
  };
  comparison: ModelComparison | null;
  headBands: HeadBand[];
  warnings: FitWarning[];
  /** Milliseconds: solver with uncertainty (incl. the profile interval), then the diagnostics. */
  timing: { fitMs: number; diagnosticsMs: number };
}

const UNITS: Record<string, string> = {
  effectiveAreaM2: 'm²',
  initialReadingM: 'm',
  sensorZeroElevationM: 'm',
  inflowM3S: 'm³/s',
  headExponent: '1',
};

export function fitDrain(input: DrainFitInput): DrainFitResult {
  const { setting, timeS, levelM, terms } = input;
  const now = input.now ?? (() => 0);
  const t0 = now();
  const datumRequired = input.knownSensorZeroM === null;
  const zs0 = input.knownSensorZeroM ?? 0;
  const data = { setting, timeS, levelM };
  const start = refineStartOnSubsample(data, terms, startTheta(setting, timeS, levelM, zs0));
  // one set of solver work buffers for the main fit and every refit after it
  const work = createSolveWorkspace();
  const best = fitVariant(data, terms, start, undefined, { work });
  const diag = residualDiagnostics(best.solve.residuals);
  const unc = uncertaintyFor(best, diag);
  const { solve } = best;

  const freeList = Array.from(best.free);
  const parameters: ParameterEstimate[] = THETA_NAMES.map((name, j) => {
    const col = freeList.indexOf(j);
    const free = col >= 0;
    const u = free ? unc.standardUncertainties[col] : 0;
    const v = best.theta[j];
    return {
      name,
      unit: UNITS[name],
      free,
      value: v,
      standardUncertainty: u,
      ci95: free ? [v - unc.coverageFactor * u, v + unc.coverageFactor * u] : null,
      start: start[j],
      atBound: free && solve.atBound.includes(col),
    };
  });

  const areaCol = freeList.indexOf(THETA.effectiveArea);
  const cdA = best.theta[THETA.effectiveArea];
  const uCdA = unc.standardUncertainties[areaCol];
  const profile = input.essentialsOnly ? null : profileIntervalEffectiveArea(data, best, unc, work);
  const effectiveArea = {
    ...effectiveAreaQuantity(cdA, uCdA, unc.degreesOfFreedom),
    profileCi95: profile ? ([profile.lower, profile.upper] as [number, number]) : null,
    profile,
  };
  const dischargeCoefficient = dischargeCoefficientQuantity(
    cdA,
    uCdA,
    unc.degreesOfFreedom,
    input.outlet.boreM,
    input.outlet.boreToleranceM ?? 0,
  );

  const t1 = now();
  const maxAbs = maxAbsolute(solve.residuals);
  const residuals = {
    samples: diag.n,
    rmseM: diag.rmse,
    maxAbsM: maxAbs,
    lag1Autocorrelation: diag.lag1Autocorrelation,
    durbinWatson: diag.durbinWatson,
  };
  const comparison = input.essentialsOnly
    ? null
    : compareModels(data, best, unc, datumRequired, work);
  const bands = input.essentialsOnly ? [] : headBands(data, best, unc.varianceInflation, 4, work);
  const warnings = fitWarnings({
    input,
    best,
    unc,
    dischargeCoefficient: dischargeCoefficient.value,
    comparison,
    bands,
    parameters,
  });
  const t2 = now();
  return {
    variant: best,
    solver: solve,
    uncertainty: unc,
    parameters,
    effectiveArea,
    dischargeCoefficient,
    nominalAreaM2: nominalAreaM2(input.outlet.boreM),
    residuals,
    comparison,
    headBands: bands,
    warnings,
    timing: { fitMs: t1 - t0, diagnosticsMs: t2 - t1 },
  };
}

/** max |r_i| (a small function of its own, so the JIT takes its loop up early). */
function maxAbsolute(r: Float64Array): number {
  let x = 0;
  for (let i = 0; i < r.length; i++) x = Math.max(x, Math.abs(r[i]));
  return x;
}
