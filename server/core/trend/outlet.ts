import { InputError } from '../errors.js';
import type { ApprovedFit, Epoch, MaintenanceEvent, TrendSettings } from './types.js';
import { splitEpochs } from './epochs.js';
import { epochLine, yearsSince, YEAR_MS, type TrendLine } from './trendline.js';
import { lineAt, lineUAt } from './line.js';
import type { ThresholdForecast } from './forecast.js';
import type { StepCheck } from './step.js';
import { assessEpoch, checkSettings, type OutletStatus } from './status.js';

export interface SeriesPoint {
  fitId: string;
  testedAtMs: number;
  /** Years since the epoch's baseline test. */
  tYears: number;
  effectiveAreaM2: number;
  effectiveAreaU: number;
  dischargeCoefficient: number;
  dischargeCoefficientU: number;
  /** Cd·a against the epoch's baseline, %. */
  changePct: number;
}

/** The line and its 95 % band for the mean (t_{0.975,dof}·u of the line's value), for drawing. */
export interface BandPoint {
  atMs: number;
  value: number;
  lower: number;
  upper: number;
}

export interface EpochTrend {
  index: number;
  startedBy: MaintenanceEvent | null;
  startMs: number;
  baselineFitId: string | null;
  series: SeriesPoint[];
  area: TrendLine | null;
  cd: TrendLine | null;
  areaBand: BandPoint[];
  cdBand: BandPoint[];
  /** Cd·a at which action is due in this epoch: baseline·(1 + pct/100). */
  thresholdM2: number | null;
  /** Only the current epoch is forecast and checked for a step; earlier ones are history. */
  forecast: ThresholdForecast | null;
  step: StepCheck | null;
}

export interface OutletTrend {
  thresholdPct: number;
  nowMs: number;
  epochs: EpochTrend[];
  status: OutletStatus;
}

export const BAND_POINTS = 41;

function band(line: TrendLine | null, fromMs: number, toMs: number): BandPoint[] {
  if (!line || !(toMs > fromMs)) return [];
  const out: BandPoint[] = [];
  const q = line.fit.tQuantile95;
  for (let i = 0; i < BAND_POINTS; i++) {
    const atMs = fromMs + ((toMs - fromMs) * i) / (BAND_POINTS - 1);
    const t = yearsSince(line.originMs, atMs);
    const v = lineAt(line.fit, t);
    const hw = q * lineUAt(line.fit, t);
    out.push({ atMs, value: v, lower: v - hw, upper: v + hw });
  }
  return out;
}

function series(ep: Epoch): SeriesPoint[] {
  const b = ep.baseline;
  return ep.fits.map((f: ApprovedFit) => ({
    fitId: f.fitId,
    testedAtMs: f.testedAtMs,
    tYears: b ? yearsSince(b.testedAtMs, f.testedAtMs) : 0,
    effectiveAreaM2: f.effectiveAreaM2,
    effectiveAreaU: f.effectiveAreaU,
    dischargeCoefficient: f.dischargeCoefficient,
    dischargeCoefficientU: f.dischargeCoefficientU,
    changePct: b ? 100 * (f.effectiveAreaM2 / b.effectiveAreaM2 - 1) : 0,
  }));
}

/**
 * Everything the API serves for one outlet: each epoch's points, its Cd·a and Cd lines with
 * bands, the threshold, and for the current epoch the forecast, the step check and the status.
 * The current epoch's band runs on past the last test to now, and on to the forecast crossing
 * (at most twice the epoch's span, or two years, past its last test) so the chart shows it.
 */
export function outletTrend(
  fits: readonly ApprovedFit[],
  events: readonly MaintenanceEvent[],
  settings: TrendSettings,
  nowMs: number,
): OutletTrend {
  checkSettings(settings);
  if (!Number.isFinite(nowMs)) throw new InputError('now is not a time', { field: 'nowMs' });
  const pct = settings.actionThresholdPct;
  const epochs = splitEpochs(fits, events);
  const lastIdx = epochs.length - 1;
  const current = assessEpoch(epochs[lastIdx], settings, nowMs);
  const out: EpochTrend[] = epochs.map((ep, i) => {
    const isCurrent = i === lastIdx;
    const area = isCurrent ? current.area : epochLine(ep, 'effectiveArea');
    const cd = epochLine(ep, 'dischargeCoefficient');
    const first = ep.fits[0]?.testedAtMs ?? NaN;
    const lastT = ep.fits[ep.fits.length - 1]?.testedAtMs ?? NaN;
    let end = lastT;
    if (isCurrent && Number.isFinite(lastT)) {
      const reach = Math.max(2 * (lastT - first), 2 * YEAR_MS);
      const fc = current.forecast;
      const want = Math.max(
        nowMs,
        fc?.status === 'forecast' ? (fc.upperMs ?? fc.crossingMs!) : -Infinity,
      );
      end = Math.min(Math.max(lastT, want), lastT + reach);
    }
    return {
      index: ep.index,
      startedBy: ep.startedBy,
      startMs: ep.startMs,
      baselineFitId: ep.baseline?.fitId ?? null,
      series: series(ep),
      area,
      cd,
      areaBand: band(area, first, end),
      cdBand: band(cd, first, end),
      thresholdM2: ep.baseline ? ep.baseline.effectiveAreaM2 * (1 + pct / 100) : null,
      forecast: isCurrent ? current.forecast : null,
      step: isCurrent ? current.step : null,
    };
  });
  return { thresholdPct: pct, nowMs, epochs: out, status: current.status };
}
