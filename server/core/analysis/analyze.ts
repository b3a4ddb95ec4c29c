import type { AnalysisOutcome, AnalysisRequest, FitJson, RawFile } from '../analysis-contract.js';
import { InputError } from '../errors.js';
import { makeShape } from '../geometry/index.js';
import { readLevelLog } from '../ingest/read-log.js';
import type { LevelSeries } from '../ingest/series.js';
import { describeLog } from '../ingest/describe.js';
import { THETA, type DrainSetting } from '../drain/parameters.js';
import { predictReadings } from '../drain/predict.js';
import { fitDrain, type DrainFitResult } from '../fit/fit-drain.js';
import { boundsFor } from '../fit/terms.js';
import { STANDARD_GRAVITY_MS2 } from '../units/index.js';
import { validateVessel, fluidDensityKgM3, type VesselSpec } from '../vessel/schema.js';
import { chooseDrainWindow, type WindowChoice } from '../window/index.js';
import { intervalWiderThanValue, positiveInterval } from '../fit/interval.js';
import { isZip, workbookAsText } from '../ingest/workbook.js';
import { ENGINE_VERSION } from '../version.js';
import { budgetForFit } from '../budget/for-fit.js';
import type { UncertaintyBudget } from '../budget/budget.js';
import { decimateForDrawing } from './plot-data.js';
import { parseWindowSetting } from './window-setting.js';

/**
 * raw bytes → series in SI → window → fit → the JSON result. Pure: the clock is injected
 * (`now`, for the timing block only), so a stored fit can be recomputed bit for bit.
 */
export interface AnalyzeHooks {
  now?: () => number;
}

export interface PreparedTest {
  vessel: VesselSpec;
  setting: DrainSetting;
  series: LevelSeries;
  choice: WindowChoice;
  knownSensorZeroM: number | null;
  density: { value: number; source: string };
}

/**
 * A request whose log (or barometric log) is an .xlsx workbook, with that file replaced by the
 * chosen sheet as text (same file name, so messages name the workbook). The shells call this
 * before analyzeDrainTest / prepareDrainTest: the workbook reader is asynchronous. Text logs
 * pass through untouched.
 */
export async function expandWorkbook(request: AnalysisRequest): Promise<AnalysisRequest> {
  const sheet = request.settings?.sheet;
  const expand = async (f: RawFile | undefined): Promise<RawFile | undefined> =>
    f && isZip(f.bytes)
      ? { bytes: (await workbookAsText(f.bytes, f.fileName, sheet)).bytes, fileName: f.fileName }
      : f;
  if (!isZip(request.log.bytes) && !(request.baro && isZip(request.baro.bytes))) return request;
  const log = (await expand(request.log))!;
  const baro = await expand(request.baro);
  return { ...request, log, ...(baro ? { baro } : {}) };
}

/** Read the log into SI with the vessel's sensor and fluid (no window yet): the live page draws this as rows arrive. */
export function readTestSeries(request: AnalysisRequest): {
  vessel: VesselSpec;
  series: LevelSeries;
  density: { value: number; source: string };
  gravity: number;
} {
  const vesselFile = request.vesselFileName ?? 'vessel';
  const vessel = validateVessel(request.vessel, vesselFile);
  const settings = request.settings ?? {};
  const density = fluidDensityKgM3(vessel);
  const gravity = vessel.gravityMS2 ?? STANDARD_GRAVITY_MS2;
  const series = readLevelLog(request.log.bytes, request.log.fileName, {
    timeColumn: settings.timeColumn,
    levelColumn: settings.levelColumn,
    unit: settings.unit,
    quantity: settings.quantity,
    dateOrder: settings.dateOrder,
    tz: settings.tz,
    tzSource: settings.tzSource === 'site' ? "the site's zone" : undefined,
    delimiter: settings.delimiter,
    decimal: settings.decimal,
    levelTag: settings.levelTag,
    baroTag: settings.baroTag,
    sheet: settings.sheet,
    baro: request.baro,
    fluidDensityKgM3: 'densityKgM3' in (vessel.fluid ?? {}) ? density.value : undefined,
    // a fluid temperature in the vessel file stands in when the log has no temperature column
    fallbackDensity:
      vessel.fluid && 'temperatureC' in vessel.fluid
        ? { valueKgM3: density.value, source: density.source }
        : undefined,
    mountElevationM: vessel.sensor?.mountElevationM,
    zeroElevationM: vessel.sensor?.zeroElevationM,
    gravityMS2: gravity,
  });
  return { vessel, series, density, gravity };
}

/** Read the log and choose the window: everything `efflux inspect` shows. */
export function prepareDrainTest(request: AnalysisRequest): PreparedTest {
  const { vessel, series, density, gravity } = readTestSeries(request);
  const settings = request.settings ?? {};
  const fromTop = series.columns.some((c) => c.role === 'distance-from-top');
  const knownSensorZeroM = vessel.sensor?.zeroElevationM ?? (fromTop ? 0 : null);
  const setting: DrainSetting = {
    shape: makeShape(vessel.shape),
    outletElevationM: vessel.outlet.elevationM,
    gravity,
  };
  const window = settings.window
    ? parseWindowSetting(settings.window, series.t0EpochMs, settings.tz)
    : undefined;
  const choice = withFile(request.log.fileName, () =>
    chooseDrainWindow(series, {
      outletReadingM:
        knownSensorZeroM === null ? undefined : vessel.outlet.elevationM - knownSensorZeroM,
      // the plan area at a reading (sensor frame), for the still-opening rule's head model
      areaAtReadingM2:
        knownSensorZeroM === null
          ? undefined
          : (y: number) => setting.shape.areaM2(y + knownSensorZeroM),
      window,
    }),
  );
  return { vessel, setting, series, choice, knownSensorZeroM, density };
}

/** Refusals about the log's content name the log file (the window module only sees arrays). */
function withFile<T>(file: string, body: () => T): T {
  try {
    return body();
  } catch (e) {
    if (e instanceof InputError && !e.file) {
      const internal = e.field === 'levelM' || e.field === 'timeS';
      throw new InputError(e.message, {
        file,
        line: e.line,
        field: internal ? undefined : e.field,
      });
    }
    throw e;
  }
}

export function analyzeDrainTest(
  request: AnalysisRequest,
  hooks: AnalyzeHooks = {},
): AnalysisOutcome {
  const now = hooks.now ?? (() => 0);
  const t0 = now();
  const prepared = prepareDrainTest(request);
  const t1 = now();
  const { vessel, setting, series, choice, knownSensorZeroM } = prepared;
  const settings = request.settings ?? {};
  if (knownSensorZeroM === null && !settings.fitDatum) {
    throw new InputError(
      'the vessel file has no sensor.zeroElevationM, so the head above the outlet is unknown: add it, or fit the datum (--fit-datum)',
      { file: request.vesselFileName ?? 'vessel', field: 'sensor.zeroElevationM' },
    );
  }
  const { timeS, levelM } = windowSamples(series, choice);
  const fit = fitDrain({
    setting,
    timeS,
    levelM,
    knownSensorZeroM,
    terms: {
      inflow: !!settings.fitInflow,
      datum: !!settings.fitDatum,
      exponent: !!settings.fitExponent,
    },
    outlet: vessel.outlet,
    now,
  });
  const t2 = now();
  const budget = budgetForFit(prepared, fit, { timeS, levelM });
  const t3 = now();
  const json = fitJson(prepared, fit, { timeS, levelM }, budget);
  // fitMs: solver and uncertainty (covariance, correction, profile interval); diagnosticsMs: the
  // model comparison, head bands and warnings; budgetMs: the uncertainty budget and drift check
  json.timing = {
    parseMs: t1 - t0,
    fitMs: fit.timing.fitMs,
    diagnosticsMs: fit.timing.diagnosticsMs,
    budgetMs: t3 - t2,
  };
  return { detected: detectedSummary(prepared), fit: json };
}

/** The samples that take part, on the window's clock (t = 0 at the window's start). */
export function windowSamples(
  series: LevelSeries,
  choice: WindowChoice,
): { timeS: Float64Array; levelM: Float64Array; lines: Int32Array } {
  const { startIndex, endIndex, startS } = choice.window;
  let count = 0;
  for (let i = startIndex; i <= endIndex; i++) count += choice.keep[i];
  const timeS = new Float64Array(count);
  const levelM = new Float64Array(count);
  const lines = new Int32Array(count);
  let j = 0;
  for (let i = startIndex; i <= endIndex; i++) {
    if (!choice.keep[i]) continue;
    timeS[j] = series.timeS[i] - startS;
    levelM[j] = series.levelM[i];
    lines[j] = series.sourceLine[i];
    j++;
  }
  return { timeS, levelM, lines };
}

export function detectedSummary(p: PreparedTest): Record<string, unknown> {
  return {
    ...describeLog(p.series),
    window: p.choice.window,
    candidates: p.choice.candidates,
    spikes: p.choice.spikes,
    flatLines: p.choice.flatLines,
    clipping: p.choice.clipping,
    trims: p.choice.trims,
    windowNotes: p.choice.notes,
    windowWarnings: p.choice.warnings,
    fluidDensity: p.density,
  };
}

const iso = (t0: number | null, s: number) =>
  t0 === null ? null : new Date(t0 + s * 1000).toISOString();

/** JSON cannot hold NaN or ±Infinity: write null. */
function finite(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function fitJson(
  p: PreparedTest,
  fit: DrainFitResult,
  data: { timeS: Float64Array; levelM: Float64Array },
  budget: UncertaintyBudget,
): FitJson {
  const { vessel, series, choice } = p;
  const w = choice.window;
  const unc = fit.uncertainty;
  const cd = fit.dischargeCoefficient;
  const ea = fit.effectiveArea;
  const free = fit.parameters.filter((q) => q.free).map((q) => q.name);
  const k = free.length;
  const matrix = free.map((_, i) => free.map((__, j) => unc.correlations[i * k + j]));
  const nominal = fit.nominalAreaM2;
  // the box the solver kept to, per free parameter (a fixed one is pinned at its value)
  const freeIndex = Array.from(fit.variant.free);
  const solverBounds = boundsFor(fit.variant.free);
  const bound = (x: number) => (Number.isFinite(x) ? x : null);

  // drawing data: the whole log, and the window with the fitted curve
  const logPlot = decimateForDrawing(series.timeS, series.levelM, 600);
  const winPlot = decimateForDrawing(data.timeS, data.levelM, 600);
  const fitted = new Float64Array(winPlot.timeS.length);
  predictReadings(
    p.setting,
    fit.variant.solution,
    fit.variant.theta,
    Float64Array.from(winPlot.timeS),
    fitted,
    null,
    new Int32Array(0),
  );

  // Cd·a and Cd are positive: intervals that would reach zero are given on the log scale, and a
  // fit whose interval is wider than its value is flagged first among the warnings.
  // (on the whole budget's intervals: the headline carries the full budget, server/core/budget)
  const bea = budget.effectiveAreaM2;
  const bcd = budget.dischargeCoefficient;
  const eaCi = positiveInterval(
    ea.value,
    bea.combinedStandardUncertainty,
    bea.coverageFactor,
    bea.ci95,
  );
  const cdCi = positiveInterval(
    cd.value,
    bcd.combinedStandardUncertainty,
    bcd.coverageFactor,
    bcd.ci95,
  );
  const uncertain =
    intervalWiderThanValue(ea.value, bea.ci95) || intervalWiderThanValue(cd.value, bcd.ci95);
  const warnings = [
    ...(uncertain
      ? [
          {
            code: 'interval-wider-than-value',
            message:
              `the 95 % interval of Cd·a (${bea.ci95.map((x) => x.toPrecision(3)).join(' to ')} m² symmetric) is wider than the value itself: ` +
              'the fit says little about Cd; do not use it without checking the window, the time column and the clock (--tz)',
            stage: 'fit',
          },
        ]
      : []),
    ...series.warnings.map((x) => ({ ...x, stage: 'reading' })),
    ...choice.warnings.map((x) => ({ ...x, stage: 'window' })),
    ...fit.warnings.map((x) => ({ ...x, stage: 'fit' })),
    ...budget.warnings.map((x) => ({ ...x, stage: 'budget' })),
  ];
  const excluded = w.samples - data.timeS.length;
  // built loosely, then read back through JSON (no NaN) as the one fit-result shape
  const json = {
    engineVersion: ENGINE_VERSION,
    converged: fit.solver.converged,
    // the headline carries the full budget (server/core/budget); typeA… keeps the fit's own part
    dischargeCoefficient: {
      value: cd.value,
      standardUncertainty: bcd.combinedStandardUncertainty,
      ci95: cdCi.ci95,
      ...(cdCi.logScale ? { ci95Scale: 'log' } : {}),
      coverageFactor: bcd.coverageFactor,
      expandedUncertainty: bcd.expandedUncertainty,
      relativeStandardUncertainty: bcd.relativeStandardUncertainty,
      effectiveDegreesOfFreedom: bcd.effectiveDegreesOfFreedom,
      fitContribution: cd.fitContribution,
      boreContribution: cd.boreContribution,
      typeAStandardUncertainty: budget.typeA.standardUncertainty / nominal,
    },
    effectiveAreaM2: {
      value: ea.value,
      standardUncertainty: bea.combinedStandardUncertainty,
      ci95: eaCi.ci95,
      ...(eaCi.logScale ? { ci95Scale: 'log' } : {}),
      coverageFactor: bea.coverageFactor,
      expandedUncertainty: bea.expandedUncertainty,
      relativeStandardUncertainty: bea.relativeStandardUncertainty,
      effectiveDegreesOfFreedom: bea.effectiveDegreesOfFreedom,
      typeAStandardUncertainty: budget.typeA.standardUncertainty,
      profileCi95: ea.profileCi95,
    },
    window: {
      startS: w.startS,
      endS: w.endS,
      samples: data.timeS.length,
      samplesInRange: w.samples,
      excludedSamples: excluded,
      startTime: iso(series.t0EpochMs, w.startS),
      endTime: iso(series.t0EpochMs, w.endS),
      chosenBy: p.choice.notes.some((n) => n.code === 'window-chosen-by-user')
        ? 'by the person'
        : 'automatically',
      trims: choice.trims,
      notes: choice.notes,
    },
    warnings,
    timing: { parseMs: 0, fitMs: 0 },
    vessel: {
      name: vessel.name,
      site: vessel.site ?? null,
      shape: vessel.shape,
      fluidDensityKgM3: p.density.value,
      fluidDensitySource: p.density.source,
      gravityMS2: p.setting.gravity,
    },
    outlet: { ...vessel.outlet, nominalAreaM2: nominal },
    model: {
      equation: 'A(h)·dh/dt = Q_in − Cd·a·(2·g·H)^n,  H = h + z_sensor − z_outlet',
      description: describeFree(fit),
      terms: fit.variant.terms,
      solution:
        fit.variant.solution === 'closed-form'
          ? 'closed form (constant plan area)'
          : 'ODE with sensitivity equations (RK4, Hermite output)',
    },
    parameters: fit.parameters.map((q, j) => {
      const col = freeIndex.indexOf(j);
      const bounds =
        col >= 0
          ? { lower: bound(solverBounds.lower[col]), upper: bound(solverBounds.upper[col]) }
          : { lower: q.value, upper: q.value };
      return {
        ...q,
        standardUncertainty: q.free ? q.standardUncertainty : null,
        bounds,
        ...(q.name === 'effectiveAreaM2' && q.ci95
          ? {
              ci95: positiveInterval(q.value, q.standardUncertainty, ea.coverageFactor, q.ci95)
                .ci95,
            }
          : {}),
      };
    }),
    correlations: { parameters: free, matrix },
    residuals: fit.residuals,
    uncertaintyMethod: {
      covariance: 's²·(JᵀJ)⁻¹ at the optimum',
      autocorrelationCorrection: unc.method,
      lag1Autocorrelation: unc.lag1Autocorrelation,
      varianceInflation: unc.varianceInflation,
      samples: unc.samples,
      effectiveSamples: unc.effectiveSamples,
      degreesOfFreedom: unc.degreesOfFreedom,
      coverageFactor: unc.coverageFactor,
      boreUncertainty:
        'bore tolerance as a rectangular distribution, u(d) = T/√3 (JCGM 100:2008, 4.3.7)',
      profile: ea.profile,
    },
    budget,
    modelComparison: fit.comparison,
    headBands: fit.headBands.map((b) => ({
      ...b,
      dischargeCoefficient: b.effectiveAreaM2 / nominal,
      standardUncertainty: b.standardUncertainty / nominal,
    })),
    solver: {
      method:
        'trust-region Levenberg–Marquardt (Moré scaling, QR with column pivoting), exact Jacobian',
      iterations: fit.solver.iterations,
      evaluations: fit.solver.evaluations,
      jacobianEvaluations: fit.solver.jacobianEvaluations,
      stopReason: fit.solver.stopReason,
      converged: fit.solver.converged,
      rank: fit.solver.rank,
      singularValues: Array.from(fit.solver.singularValues),
      sumSquares: fit.solver.sumSquares,
    },
    read: {
      columns: series.columns,
      notes: series.notes,
      t0: iso(series.t0EpochMs, 0),
      samples: series.timeS.length,
    },
    plot: {
      log: { timeS: logPlot.timeS, levelM: logPlot.values },
      window: {
        offsetS: w.startS,
        timeS: winPlot.timeS,
        observedM: winPlot.values,
        fittedM: Array.from(fitted),
      },
    },
  };
  return JSON.parse(
    JSON.stringify(json, (_k, v) => (typeof v === 'number' ? finite(v) : v)),
  ) as FitJson;
}

function describeFree(fit: DrainFitResult): string {
  const t = fit.variant.terms;
  const extras = [
    t.datum && 'sensor datum',
    t.inflow && 'constant inflow',
    t.exponent && 'head exponent',
  ].filter(Boolean);
  return `Cd·a and the initial level${extras.length ? ', ' + extras.join(', ') : ''}; n = ${t.exponent ? 'fitted' : fit.variant.theta[THETA.exponent]}`;
}
