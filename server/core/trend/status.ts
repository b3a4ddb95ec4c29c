import { InputError } from '../errors.js';
import type { ApprovedFit, Epoch, MaintenanceEvent, TrendSettings } from './types.js';
import { splitEpochs } from './epochs.js';
import { epochLine, type TrendLine } from './trendline.js';
import { forecastThresholdCrossing, type ThresholdForecast } from './forecast.js';
import { detectStep, type StepCheck } from './step.js';

export type StatusWord =
  | 'past threshold'
  | 'sudden change'
  | 'action due soon'
  | 'drifting'
  | 'not enough tests'
  | 'steady';

/** Severity order, used where the time to threshold does not separate two outlets. */
const RANK: Record<StatusWord, number> = {
  'past threshold': 0,
  'sudden change': 1,
  'action due soon': 2,
  drifting: 3,
  'not enough tests': 4,
  steady: 5,
};

export const DEFAULT_SOON_DAYS = 180;

export interface OutletStatus {
  status: StatusWord;
  /** One sentence a maintenance planner can act on. */
  reason: string;
  /** Days from now to the forecast crossing (negative: already crossed, 0: latest test past it); null when unknown. */
  daysToThreshold: number | null;
  crossingMs: number | null;
  epochIndex: number;
  testsInEpoch: number;
  latestTestMs: number | null;
  /** Latest test against the epoch's baseline, %. */
  latestChangePct: number | null;
  slopePctPerYear: number | null;
  thresholdPct: number;
}

/** What the current epoch yields: the pieces a status is made of. */
export interface EpochAssessment {
  area: TrendLine | null;
  forecast: ThresholdForecast | null;
  step: StepCheck | null;
  status: OutletStatus;
}

const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

export function checkSettings(s: TrendSettings): void {
  if (
    !Number.isFinite(s.actionThresholdPct) ||
    s.actionThresholdPct === 0 ||
    s.actionThresholdPct <= -100
  )
    throw new InputError('action threshold must be a non-zero percentage above −100', {
      field: 'actionThresholdPct',
    });
  if (s.soonDays !== undefined && !(s.soonDays >= 0))
    throw new InputError('soonDays must be ≥ 0', { field: 'soonDays' });
}

/** Status of one epoch (normally the current, last one). */
export function assessEpoch(epoch: Epoch, settings: TrendSettings, nowMs: number): EpochAssessment {
  const pct = settings.actionThresholdPct;
  const soon = settings.soonDays ?? DEFAULT_SOON_DAYS;
  const dir = Math.sign(pct);
  const fits: ApprovedFit[] = epoch.fits;
  const n = fits.length;
  const make = (
    status: StatusWord,
    reason: string,
    extra: Partial<OutletStatus> = {},
  ): OutletStatus => ({
    status,
    reason,
    daysToThreshold: null,
    crossingMs: null,
    epochIndex: epoch.index,
    testsInEpoch: n,
    latestTestMs: n ? fits[n - 1].testedAtMs : null,
    latestChangePct,
    slopePctPerYear: null,
    thresholdPct: pct,
    ...extra,
  });
  const base = epoch.baseline;
  const last = n ? fits[n - 1] : null;
  const latestChangePct =
    base && last ? 100 * (last.effectiveAreaM2 / base.effectiveAreaM2 - 1) : null;
  if (!base || !last) {
    const what = epoch.startedBy
      ? `the ${epoch.startedBy.kind === 'cleaned' ? 'cleaning' : epoch.startedBy.kind === 'replaced' ? 'replacement' : 'modification'} on ${iso(epoch.startMs)}`
      : 'the start';
    return {
      area: null,
      forecast: null,
      step: null,
      status: make('not enough tests', `no test since ${what}: the next test sets the baseline`),
    };
  }
  const pastByTest = latestChangePct !== null && dir * (latestChangePct - pct) >= 0;
  const pastReason = () =>
    `the latest test (${iso(last.testedAtMs)}) is ${latestChangePct!.toFixed(1)} % from the baseline, beyond the ${pct} % threshold`;
  const area = epochLine(epoch, 'effectiveArea');
  if (!area) {
    if (pastByTest)
      return {
        area,
        forecast: null,
        step: null,
        status: make('past threshold', pastReason(), { daysToThreshold: 0 }),
      };
    return {
      area,
      forecast: null,
      step: null,
      status: make(
        'not enough tests',
        `${n} test${n === 1 ? '' : 's'} since the baseline of ${iso(base.testedAtMs)}: a trend needs 3`,
      ),
    };
  }
  const forecast = forecastThresholdCrossing(area, base.effectiveAreaM2, pct, nowMs);
  const step = detectStep(fits, area.fit);
  const common = {
    slopePctPerYear: area.slopePctPerYear,
    crossingMs: forecast.crossingMs,
    daysToThreshold: forecast.daysFromNow,
  };
  let status: OutletStatus;
  if (forecast.status === 'crossed' || pastByTest) {
    const days = forecast.status === 'crossed' ? Math.min(0, forecast.daysFromNow!) : 0;
    status = make('past threshold', pastByTest ? pastReason() : forecast.reason, {
      ...common,
      daysToThreshold: days,
    });
  } else if (step.flagged) {
    status = make('sudden change', step.reason, common);
  } else if (forecast.status === 'forecast' && forecast.daysFromNow! <= soon) {
    status = make(
      'action due soon',
      `${forecast.reason}: ${Math.round(forecast.daysFromNow!)} days from now`,
      common,
    );
  } else if (forecast.status === 'forecast') {
    status = make('drifting', forecast.reason, common);
  } else {
    const ci = area.slopePctPerYearInterval95;
    const sig = ci.lower > 0 || ci.upper < 0;
    status = sig
      ? make(
          'drifting',
          `${forecast.reason}; 95 % interval ${ci.lower.toFixed(2)} to ${ci.upper.toFixed(2)} %/year`,
          common,
        )
      : make(
          'steady',
          `no trend distinguishable from zero: ${area.slopePctPerYear.toFixed(2)} %/year, 95 % interval ${ci.lower.toFixed(2)} to ${ci.upper.toFixed(2)}`,
          common,
        );
  }
  return { area, forecast, step, status };
}

/** The current status of one outlet: only its last epoch is analysed. */
export function outletStatus(
  fits: readonly ApprovedFit[],
  events: readonly MaintenanceEvent[],
  settings: TrendSettings,
  nowMs: number,
): OutletStatus {
  checkSettings(settings);
  if (!Number.isFinite(nowMs)) throw new InputError('now is not a time', { field: 'nowMs' });
  const epochs = splitEpochs(fits, events);
  return assessEpoch(epochs[epochs.length - 1], settings, nowMs).status;
}

/**
 * A fleet in the order to act on it: soonest (or longest past) threshold first; outlets with no
 * forecast last, the more severe of those first. Returns a new array; equal keys keep their order.
 */
export function fleetOrder<T extends OutletStatus>(statuses: readonly T[]): T[] {
  return [...statuses].sort((a, b) => {
    const da = a.daysToThreshold,
      db = b.daysToThreshold;
    if (da !== null && db !== null && da !== db) return da - db;
    if (da === null && db !== null) return 1;
    if (da !== null && db === null) return -1;
    return RANK[a.status] - RANK[b.status];
  });
}
