/** Shapes of the trend answers (server/jobs/trend.ts builds them; README documents each field). */
import { z } from 'zod';

const STATUS = z.enum(['past threshold', 'sudden change', 'action due soon', 'drifting', 'not enough tests', 'steady']);
const FORECAST_STATUS = z.enum(['forecast', 'crossed', 'not-significant', 'away-from-threshold']);
const n = z.number();
const nn = z.number().nullable();
const sn = z.string().nullable();

export const statusWord = STATUS;

export const outletRef = z.object({ id: z.number().int(), key: z.string(), vesselId: z.number().int(), vesselName: z.string(), site: z.string(), retired: z.boolean() });

export const threshold = z
  .object({ pct: n, fraction: nn, source: z.string() })
  .meta({ id: 'ActionThreshold', description: 'Act when Cd·a has moved pct % from the epoch baseline (fraction = 1 + pct/100)' });

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

const line = z
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

const forecast = z
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

const step = z
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

const point = z.object({
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

const epoch = z.object({
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
});

export const trendView = z
  .object({
    outlet: outletRef,
    asOf: z.string(),
    nowMs: n,
    threshold,
    status: outletStatus,
    epochs: z.array(epoch),
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

/** `asOf`: evaluate the trend at this time instead of now (ISO date or date-time). */
export const asOfQuery = z.object({ asOf: z.iso.date().or(z.iso.datetime({ offset: true })).optional() });
