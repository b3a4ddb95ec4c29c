/**
 * The service side of trending (shell): reads an outlet's approved fits and events from the store,
 * runs server/core/trend on them, and shapes the answer the API and the CLI give. The fleet view
 * reads each outlet's cached status (server/store/trends.ts), recomputing only stale outlets and
 * those whose status time alone has moved on (a forecast date passing).
 */
import { DEFAULT_ACTION_THRESHOLD_PCT } from '../core/report/outlet-report.js';
import {
  assessEpoch,
  DAY_MS,
  DEFAULT_SOON_DAYS,
  detectStep,
  epochLine,
  fleetOrder,
  outletTrend,
  splitEpochs,
  type BandPoint,
  type ForecastStatus,
  type OutletStatus,
  type StatusWord,
  type StepCheck,
  type ThresholdForecast,
  type TrendLine,
} from '../core/trend/index.js';
import type { Store } from '../store/index.js';
import type { CachedStatus, SkippedFit, TrendFitRow } from '../store/trends.js';
import type { Outlet } from '../store/vessels.js';
import type {
  EpochView,
  FleetItem,
  FleetView,
  ForecastView,
  LineView,
  OutletRef,
  PointView,
  StatusView,
  StepView,
  ThresholdChoice,
  TrendView,
} from './trend-views.js';

export type {
  EpochView,
  FleetItem,
  FleetView,
  ForecastView,
  LineView,
  OutletRef,
  PointView,
  StatusView,
  StepView,
  ThresholdChoice,
  TrendView,
};
import { csvText } from '../core/report/csv.js';

export const STATUS_WORDS: readonly StatusWord[] = [
  'past threshold',
  'sudden change',
  'action due soon',
  'drifting',
  'not enough tests',
  'steady',
];

const iso = (ms: number | null) =>
  ms === null || !Number.isFinite(ms) ? null : new Date(ms).toISOString();
const fin = (x: number | null | undefined) =>
  x === null || x === undefined || !Number.isFinite(x) ? null : x;

/** The outlet's threshold as a percentage; the project's default (−10 %) when it has none. */
export function thresholdOf(o: Pick<Outlet, 'actionThreshold'>): ThresholdChoice {
  const f = o.actionThreshold;
  if (f !== null && f > 0 && f < 2 && f !== 1) {
    // below 1: fouling (a loss of Cd·a); above 1: erosion (a gain)
    // rounded so 0.9 reads as −10 %, not −9.999999999999998 %
    return {
      pct: Math.round((f - 1) * 100 * 1e9) / 1e9,
      fraction: f,
      source: `the outlet's action threshold: ${f} of the baseline Cd·a`,
    };
  }
  return {
    pct: DEFAULT_ACTION_THRESHOLD_PCT,
    fraction: null,
    source: `no threshold set on the outlet: the default, ${DEFAULT_ACTION_THRESHOLD_PCT} % of the baseline Cd·a`,
  };
}

async function outletRef(
  store: Store,
  outletId: number,
): Promise<{ ref: OutletRef; outlet: Outlet }> {
  const o = await store.vessels.outlet(outletId);
  const v = await store.vessels.get(o.vesselId);
  return {
    ref: {
      id: o.id,
      key: o.key,
      vesselId: v.id,
      vesselName: v.name,
      site: v.site,
      retired: o.retiredAt !== null,
    },
    outlet: o,
  };
}

// ---- shapes of the answer (documented in server/http/README.md) ----

function statusView(s: OutletStatus): StatusView {
  return {
    status: s.status,
    reason: s.reason,
    daysToThreshold: fin(s.daysToThreshold),
    crossingAt: iso(s.crossingMs),
    crossingMs: fin(s.crossingMs),
    epochIndex: s.epochIndex,
    testsInEpoch: s.testsInEpoch,
    latestTestAt: iso(s.latestTestMs),
    latestChangePct: fin(s.latestChangePct),
    slopePctPerYear: fin(s.slopePctPerYear),
    thresholdPct: s.thresholdPct,
  };
}

function lineView(l: TrendLine | null): LineView | null {
  if (!l) return null;
  return {
    originAt: iso(l.originMs)!,
    baselineValue: l.baselineValue,
    intercept: l.fit.intercept,
    slopePerYear: l.slopePerYear,
    slopePerYearU: l.slopePerYearU,
    slopePctPerYear: l.slopePctPerYear,
    slopePctPerYearU: l.slopePctPerYearU,
    slopePctPerYearInterval95: l.slopePctPerYearInterval95,
    n: l.fit.n,
    dof: l.fit.dof,
    reducedChi2: l.fit.reducedChi2,
    birgeRatio: l.fit.birgeRatio,
    scaled: l.fit.scaled,
    lackOfFitP: l.fit.lackOfFitP,
  };
}

function forecastView(f: ThresholdForecast | null): ForecastView | null {
  if (!f) return null;
  return {
    status: f.status,
    thresholdValue: f.thresholdValue,
    crossingAt: iso(f.crossingMs),
    crossingMs: fin(f.crossingMs),
    lowerAt: iso(f.lowerMs),
    lowerMs: fin(f.lowerMs),
    upperAt: iso(f.upperMs),
    upperMs: fin(f.upperMs),
    daysFromNow: fin(f.daysFromNow),
    reason: f.reason,
  };
}

const stepView = (s: StepCheck | null): StepView | null =>
  s && {
    flagged: s.flagged,
    by: s.by,
    fitId: s.fitId === null ? null : Number(s.fitId),
    alarmFitId: s.alarmFitId === null ? null : Number(s.alarmFitId),
    direction: s.direction,
    latestZ: fin(s.latestZ),
    reason: s.reason,
  };

const bandView = (b: BandPoint[]) =>
  b.filter((p) => Number.isFinite(p.value) && Number.isFinite(p.lower) && Number.isFinite(p.upper));

/** One outlet's whole trend as the API serves it. */
export async function outletTrendView(
  store: Store,
  outletId: number,
  nowMs: number,
): Promise<TrendView> {
  const { ref, outlet } = await outletRef(store, outletId);
  const threshold = thresholdOf(outlet);
  const { fits, skipped } = await store.trends.approvedFits(outletId);
  const events = await store.trends.events(outletId);
  const settings = { actionThresholdPct: threshold.pct };
  const trend = outletTrend(fits, events, settings, nowMs);
  const rows = new Map<string, TrendFitRow>(fits.map((f) => [f.fitId, f]));
  // The core checks steps in the current epoch only; earlier epochs get the same check here,
  // so a blockage that a cleaning later removed still shows on the chart.
  const epochs = splitEpochs(fits, events);
  const last = trend.epochs.length - 1;
  const out: EpochView[] = trend.epochs.map((ep, i) => {
    let step = ep.step;
    if (i !== last && epochs[i].fits.length > 0)
      step = detectStep(epochs[i].fits, epochLine(epochs[i], 'effectiveArea')?.fit ?? null);
    const baseline = epochs[i].baseline;
    return {
      index: ep.index,
      current: i === last,
      startedBy: ep.startedBy && {
        kind: ep.startedBy.kind,
        at: iso(ep.startedBy.atMs)!,
        atMs: ep.startedBy.atMs,
        note: ep.startedBy.note ?? null,
      },
      startAt: iso(ep.startMs),
      startMs: fin(ep.startMs),
      baselineFitId: ep.baselineFitId === null ? null : Number(ep.baselineFitId),
      series: ep.series.map((p, k) => {
        const row = rows.get(p.fitId)!;
        return {
          fitId: Number(p.fitId),
          testId: row.testId,
          testedAt: row.testedAt,
          testedAtMs: p.testedAtMs,
          approvedAt: row.approvedAt,
          tYears: p.tYears,
          effectiveAreaM2: p.effectiveAreaM2,
          effectiveAreaU: p.effectiveAreaU,
          dischargeCoefficient: p.dischargeCoefficient,
          dischargeCoefficientU: p.dischargeCoefficientU,
          changePct: p.changePct,
          isBaseline: p.fitId === ep.baselineFitId,
          stepZ: step ? fin(step.z[k]) : null,
        };
      }),
      area: lineView(ep.area),
      cd: lineView(ep.cd),
      areaBand: bandView(ep.areaBand),
      cdBand: bandView(ep.cdBand),
      thresholdM2: fin(ep.thresholdM2),
      thresholdCd: baseline ? baseline.dischargeCoefficient * (1 + threshold.pct / 100) : null,
      forecast: forecastView(ep.forecast),
      step: stepView(step),
    };
  });
  return {
    outlet: ref,
    asOf: iso(nowMs)!,
    nowMs,
    threshold,
    status: statusView(trend.status),
    epochs: out,
    skipped,
  };
}

// ---- status, cached per outlet ----

interface Computed {
  status: StatusView;
  forecastStatus: ForecastStatus | null;
  validUntilMs: number;
}

/**
 * An outlet's current status at nowMs, and until when time alone leaves it as it is: a forecast
 * turns into "crossed" on its date, "drifting" into "action due soon" soonDays before it, and
 * the reason of "action due soon" counts days, so it is recomputed at least daily.
 */
export async function computeStatus(
  store: Store,
  outletId: number,
  nowMs: number,
): Promise<Computed> {
  const outlet = await store.vessels.outlet(outletId);
  const pct = thresholdOf(outlet).pct;
  const { fits } = await store.trends.approvedFits(outletId);
  const epochs = splitEpochs(fits, await store.trends.events(outletId));
  const a = assessEpoch(epochs[epochs.length - 1], { actionThresholdPct: pct }, nowMs);
  const s = a.status;
  let validUntilMs = Infinity;
  if (a.forecast?.status === 'forecast' && a.forecast.crossingMs !== null) {
    const c = a.forecast.crossingMs;
    validUntilMs = c;
    if (s.status === 'drifting') validUntilMs = c - DEFAULT_SOON_DAYS * DAY_MS;
    if (s.status === 'action due soon') validUntilMs = Math.min(c, nowMs + DAY_MS);
  }
  return { status: statusView(s), forecastStatus: a.forecast?.status ?? null, validUntilMs };
}

/** Computes an outlet's status and stores it in the cache (inside the caller's transaction when there is one). */
export async function refreshStatus(
  store: Store,
  outletId: number,
  nowMs: number,
): Promise<Computed> {
  const c = await computeStatus(store, outletId, nowMs);
  await store.trends.saveStatus(outletId, {
    status: c.status.status,
    daysToThreshold: c.status.daysToThreshold,
    computedAtMs: nowMs,
    validUntilMs: c.validUntilMs,
    body: { ...c.status, forecastStatus: c.forecastStatus },
  });
  return c;
}

/** A cached status brought forward to nowMs: only the days to the threshold move. */
function aged(row: CachedStatus, nowMs: number): FleetItem {
  const b = row.body as unknown as StatusView & { forecastStatus: ForecastStatus | null };
  const fixedZero = b.status === 'past threshold' && b.forecastStatus !== 'crossed';
  const days =
    b.crossingMs !== null && b.daysToThreshold !== null && !fixedZero
      ? (b.crossingMs - nowMs) / DAY_MS
      : b.daysToThreshold;
  return {
    outletId: row.outletId,
    outletKey: row.outletKey,
    vesselId: row.vesselId,
    vesselName: row.vesselName,
    site: row.site,
    retired: row.retired,
    ...b,
    daysToThreshold: days,
  };
}

/** Recomputes stale outlets and those whose cached status time has overtaken; returns how many. */
export async function refreshStale(store: Store, nowMs: number): Promise<number> {
  const stale = new Set(await store.trends.staleOutlets());
  for (const r of await store.trends.cachedStatuses())
    if (nowMs >= r.validUntilMs || nowMs < r.computedAtMs) stale.add(r.outletId);
  if (stale.size === 0) return 0;
  await store.sql.tx(async () => {
    for (const id of stale) await refreshStatus(store, id, nowMs);
  });
  return stale.size;
}

export interface FleetQuery {
  /** Only these sites (a person limited to sites); undefined or null = every site. */
  sites?: readonly string[] | null;
  site?: string;
  status?: StatusWord[];
  includeRetired?: boolean;
}

/** Every outlet's status, in the order to act on them (soonest threshold first). */
export async function fleetStatus(store: Store, q: FleetQuery, nowMs: number): Promise<FleetView> {
  const recomputed = await refreshStale(store, nowMs);
  let items = (await store.trends.cachedStatuses()).map((r) => aged(r, nowMs));
  if (!q.includeRetired) items = items.filter((i) => !i.retired);
  if (q.site !== undefined) items = items.filter((i) => i.site === q.site);
  if (q.sites) items = items.filter((i) => q.sites!.includes(i.site));
  const counts: Record<string, number> = {};
  for (const w of STATUS_WORDS) counts[w] = 0;
  for (const i of items) counts[i.status]++;
  if (q.status?.length) items = items.filter((i) => q.status!.includes(i.status));
  return {
    asOf: iso(nowMs)!,
    nowMs,
    recomputed,
    counts,
    items: fleetOrder(items as unknown as OutletStatus[]) as unknown as FleetItem[],
  }; // fleetOrder reads status and daysToThreshold only
}

// ---- history for a spreadsheet ----

const CSV_HEADER = [
  'fit_id',
  'test_id',
  'tested_at',
  'approved_at',
  'epoch',
  'epoch_started_by',
  'is_baseline',
  'effective_area_m2',
  'u_effective_area_m2',
  'discharge_coefficient',
  'u_discharge_coefficient',
  'change_from_baseline_pct',
];

/** An outlet's approved fits with their standard uncertainties and epoch, one row each (RFC 4180, CRLF). */
export function historyCsv(view: TrendView): string {
  const rows: (string | number | boolean | null)[][] = [CSV_HEADER];
  for (const ep of view.epochs) {
    for (const p of ep.series) {
      rows.push([
        p.fitId,
        p.testId,
        p.testedAt,
        p.approvedAt,
        ep.index,
        ep.startedBy?.kind ?? 'first tests',
        p.isBaseline,
        p.effectiveAreaM2,
        p.effectiveAreaU,
        p.dischargeCoefficient,
        p.dischargeCoefficientU,
        Number(p.changePct.toFixed(6)),
      ]);
    }
  }
  return csvText(rows);
}
