import { InputError } from '../errors.js';
import type { ApprovedFit, Epoch, MaintenanceEvent, TrendSettings } from './types.js';
import { splitEpochs } from './epochs.js';
import { epochLine, yearsSince, YEAR_MS, type TrendLine } from './trendline.js';
import { lineAt, lineUAt } from './line.js';
import type { ThresholdForecast } from './forecast.js';
import { detectStep, type StepCheck } from './step.js';
import { predictNewTest, type NewTestPrediction } from './due.js';
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

/**
 * A stretch of an epoch drawn with its own line: the whole epoch, or, when a step is flagged in
 * it, the tests before the step and those from it on. A stretch with fewer than 3 tests has no
 * line (points only): one straight line is never drawn through a step.
 */
export interface TrendSegment {
  /** Ids of the segment's fits, in time order. */
  fitIds: string[];
  firstMs: number;
  lastMs: number;
  /** 'step' when the segment starts at a flagged step (its fitId), null for the epoch's first. */
  startedBy: 'step' | null;
  area: TrendLine | null;
  cd: TrendLine | null;
  areaBand: BandPoint[];
  cdBand: BandPoint[];
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

/**
 * What the chart and the due list add to an epoch. Kept apart from EpochTrend so an outlet
 * report (which embeds OutletTrend and must rebuild to the same content) does not change.
 */
export interface EpochDetail {
  /** The epoch cut at a flagged step (each part its own line or none); one segment otherwise. */
  segments: TrendSegment[];
  /** Current epoch only: what a test made now would read (Cd·a), with a 95 % prediction interval. */
  newTestNow: NewTestPrediction | null;
  /** Current epoch only: the 95 % prediction band of a new test from the last test to the band's end. */
  areaNewTestBand: BandPoint[];
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

function newTestBand(line: TrendLine | null, fromMs: number, toMs: number): BandPoint[] {
  if (!line || !(toMs > fromMs)) return [];
  const out: BandPoint[] = [];
  for (let i = 0; i < BAND_POINTS; i++) {
    const p = predictNewTest(line, fromMs + ((toMs - fromMs) * i) / (BAND_POINTS - 1));
    out.push({ atMs: p.atMs, value: p.value, lower: p.lower, upper: p.upper });
  }
  return out;
}

/** The epoch's fits cut at its flagged step (if any); the last segment's band runs to endMs. */
function segmentsOf(ep: Epoch, step: StepCheck | null, endMs: number): TrendSegment[] {
  const fits = ep.fits;
  if (!fits.length) return [];
  const cut =
    step?.flagged && step.fitId !== null ? fits.findIndex((f) => f.fitId === step.fitId) : -1;
  const parts = cut > 0 ? [fits.slice(0, cut), fits.slice(cut)] : [fits];
  return parts.map((part, k) => {
    const sub: Epoch = { ...ep, fits: part, baseline: part[0] };
    const area = epochLine(sub, 'effectiveArea');
    const cd = epochLine(sub, 'dischargeCoefficient');
    const firstMs = part[0].testedAtMs;
    const lastMs = part[part.length - 1].testedAtMs;
    const to = k === parts.length - 1 ? Math.max(lastMs, endMs) : lastMs;
    return {
      fitIds: part.map((f) => f.fitId),
      firstMs,
      lastMs,
      startedBy: k === 0 ? null : 'step',
      area,
      cd,
      areaBand: band(area, firstMs, to),
      cdBand: band(cd, firstMs, to),
    };
  });
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
  return outletTrendDetailed(fits, events, settings, nowMs).trend;
}

/** outletTrend, and beside it each epoch's segments and the forecast of a new test (EpochDetail). */
export function outletTrendDetailed(
  fits: readonly ApprovedFit[],
  events: readonly MaintenanceEvent[],
  settings: TrendSettings,
  nowMs: number,
): { trend: OutletTrend; details: EpochDetail[] } {
  checkSettings(settings);
  if (!Number.isFinite(nowMs)) throw new InputError('now is not a time', { field: 'nowMs' });
  const pct = settings.actionThresholdPct;
  const epochs = splitEpochs(fits, events);
  const lastIdx = epochs.length - 1;
  const current = assessEpoch(epochs[lastIdx], settings, nowMs);
  const details: EpochDetail[] = [];
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
    // every epoch is checked for a step (earlier ones too: a blockage a cleaning later removed)
    const stepHere = isCurrent
      ? current.step
      : ep.fits.length
        ? detectStep(ep.fits, epochLine(ep, 'effectiveArea')?.fit ?? null)
        : null;
    const segments = segmentsOf(ep, stepHere, end);
    const lastSeg = segments[segments.length - 1];
    // after a step the latest stretch predicts the next test; with too few tests there, nothing does
    const predictor = isCurrent ? (segments.length > 1 ? (lastSeg?.area ?? null) : area) : null;
    details.push({
      segments,
      newTestNow: predictor ? predictNewTest(predictor, nowMs) : null,
      areaNewTestBand: predictor ? newTestBand(predictor, lastT, Math.max(end, nowMs)) : [],
    });
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
  return { trend: { thresholdPct: pct, nowMs, epochs: out, status: current.status }, details };
}
