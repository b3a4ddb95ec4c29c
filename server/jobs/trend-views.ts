/**
 * The trend answers' shapes, defined once: zod schemas (the API validates and documents with them,
 * server/http/routes/trend.ts) and the types inferred from them (server/jobs/trend.ts builds them;
 * the web imports the types only). server/http/README.md documents each field.
 */
import { z } from 'zod';

const STATUS = z.enum([
  'past threshold',
  'sudden change',
  'action due soon',
  'drifting',
  'not enough tests',
  'steady',
]);
const FORECAST_STATUS = z.enum(['forecast', 'crossed', 'not-significant', 'away-from-threshold']);
const n = z.number();
const nn = z.number().nullable();
const sn = z.string().nullable();

export const statusWord = STATUS;

export const outletRef = z.object({
  id: z.number().int(),
  key: z.string(),
  vesselId: z.number().int(),
  vesselName: z.string(),
  site: z.string(),
  retired: z.boolean(),
});

export const threshold = z.object({ pct: n, fraction: nn, source: z.string() }).meta({
  id: 'ActionThreshold',
  description: 'Act when Cd·a has moved pct % from the epoch baseline (fraction = 1 + pct/100)',
});

const statusFields = {
  status: STATUS,
  reason: z.string(),
  daysToThreshold: nn,
  crossingAt: sn,
  crossingMs: nn,
  epochIndex: z.number().int(),
  testsInEpoch: z.number().int(),
  latestTestAt: sn,
  latestChangePct: nn,
  slopePctPerYear: nn,
  thresholdPct: n,
};
export const outletStatus = z.object(statusFields).meta({ id: 'OutletStatus' });

export const line = z
  .object({
    originAt: z.string(),
    baselineValue: n,
    intercept: n,
    slopePerYear: n,
    slopePerYearU: n,
    slopePctPerYear: n,
    slopePctPerYearU: n,
    slopePctPerYearInterval95: z.object({ lower: n, upper: n }),
    n: z.number().int(),
    dof: z.number().int(),
    reducedChi2: n,
    birgeRatio: n,
    scaled: z.boolean(),
    lackOfFitP: n,
  })
  .nullable()
  .meta({ id: 'TrendLine' });

const band = z.array(z.object({ atMs: n, value: n, lower: n, upper: n }));

export const forecast = z
  .object({
    status: FORECAST_STATUS,
    thresholdValue: n,
    crossingAt: sn,
    crossingMs: nn,
    lowerAt: sn,
    lowerMs: nn,
    upperAt: sn,
    upperMs: nn,
    daysFromNow: nn,
    reason: z.string(),
  })
  .nullable()
  .meta({ id: 'ThresholdForecast' });

export const step = z
  .object({
    flagged: z.boolean(),
    by: z.enum(['cusum', 'latest-test', 'both']).nullable(),
    fitId: nn,
    alarmFitId: nn,
    direction: z.enum(['drop', 'rise']).nullable(),
    latestZ: nn,
    reason: z.string(),
  })
  .nullable()
  .meta({ id: 'StepCheck' });

export const point = z.object({
  fitId: z.number().int(),
  testId: z.number().int(),
  testedAt: z.string(),
  testedAtMs: n,
  approvedAt: sn,
  tYears: n,
  effectiveAreaM2: n,
  effectiveAreaU: n,
  dischargeCoefficient: n,
  dischargeCoefficientU: n,
  changePct: n,
  isBaseline: z.boolean(),
  stepZ: nn,
});

const segment = z.object({
  fitIds: z.array(z.number().int()),
  firstMs: n,
  lastMs: n,
  startedBy: z.enum(['step']).nullable(),
  area: line,
  cd: line,
  areaBand: band,
  cdBand: band,
});

export const newTestPrediction = z
  .object({ at: z.string(), atMs: n, value: n, u: n, lower: n, upper: n, halfWidth95: n })
  .nullable()
  .meta({
    id: 'NewTestPrediction',
    description:
      "Cd·a (m²) a test made then is expected to read about the trend line, with its 95 % prediction interval for a new test (the line's band plus a single test's scatter)",
  });

/** When the outlet is next due for a drain test (server/core/trend/due.ts). */
export const schedule = z
  .object({
    intervalDays: z.number().int(),
    intervalSource: z.enum(['outlet', 'site']),
    latestTestAt: sn,
    latestTestAgeDays: nn,
    nextDueAt: sn,
    nextDueMs: nn,
    daysUntilDue: nn,
    overdue: z.boolean(),
    neverTested: z.boolean(),
    /** One sentence: when due, or how long overdue and how old the latest test is. */
    reason: z.string(),
  })
  .meta({ id: 'TestSchedule' });

export const epoch = z.object({
  index: z.number().int(),
  current: z.boolean(),
  startedBy: z.object({ kind: z.string(), at: z.string(), atMs: n, note: sn }).nullable(),
  startAt: sn,
  startMs: nn,
  baselineFitId: nn,
  series: z.array(point),
  area: line,
  cd: line,
  areaBand: band,
  cdBand: band,
  thresholdM2: nn,
  thresholdCd: nn,
  forecast,
  step,
  /** The epoch cut at a flagged step: each part its own line (or none with fewer than 3 tests). */
  segments: z.array(segment),
  /** Current epoch only: what a test made now would read. */
  newTestNow: newTestPrediction,
  /** Current epoch only: the 95 % prediction band of a new test, from the last test on. */
  areaNewTestBand: band,
});

export const trendView = z
  .object({
    outlet: outletRef,
    asOf: z.string(),
    nowMs: n,
    threshold,
    status: outletStatus,
    epochs: z.array(epoch),
    schedule,
    skipped: z.array(z.object({ fitId: z.number().int(), why: z.string() })),
  })
  .meta({ id: 'OutletTrend' });

export const fleetItem = z.object({
  outletId: z.number().int(),
  outletKey: z.string(),
  vesselId: z.number().int(),
  vesselName: z.string(),
  site: z.string(),
  retired: z.boolean(),
  forecastStatus: FORECAST_STATUS.nullable(),
  ...statusFields,
  schedule: schedule.nullable(),
});

export const fleetView = z
  .object({
    asOf: z.string(),
    nowMs: n,
    recomputed: z.number().int(),
    counts: z.record(z.string(), z.number().int()),
    items: z.array(fleetItem),
    total: z.number().int(),
    limit: z.number().int(),
    offset: z.number().int(),
  })
  .meta({ id: 'Fleet' });

export const statusChange = z
  .object({
    id: z.number().int(),
    outletId: z.number().int(),
    fitId: nn,
    fromStatus: sn,
    toStatus: z.string(),
    reason: z.string(),
    daysToThreshold: nn,
    at: z.string(),
  })
  .meta({ id: 'StatusChange' });

export type StatusView = z.infer<typeof outletStatus>;
export type LineView = NonNullable<z.infer<typeof line>>;
export type ForecastView = NonNullable<z.infer<typeof forecast>>;
export type StepView = NonNullable<z.infer<typeof step>>;
export type PointView = z.infer<typeof point>;
export type EpochView = z.infer<typeof epoch>;
export type TrendView = z.infer<typeof trendView>;
export type OutletRef = z.infer<typeof outletRef>;
export type ThresholdChoice = z.infer<typeof threshold>;
export type FleetItem = z.infer<typeof fleetItem>;
export type ScheduleView = z.infer<typeof schedule>;
export type NewTestView = NonNullable<z.infer<typeof newTestPrediction>>;
/** The fleet answer before paging (the route adds total, limit and offset). */
export type FleetView = Omit<z.infer<typeof fleetView>, 'total' | 'limit' | 'offset'>;
