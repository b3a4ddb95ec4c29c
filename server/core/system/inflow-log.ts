import { InputError } from '../errors.js';
import type { Alignment } from './align.js';
import type { FlowSeries } from './flow-log.js';
import type { InflowInput } from './network.js';

/**
 * A logged inflow on the fit's clock (t = 0 at the levels' common start), as the piecewise-linear
 * schedule the ODE reads (network.ts inflowAt). The log must cover the whole fitted span: a flow
 * held constant past the last reading would be invented, so a short log is refused, naming both
 * spans. Only the samples that bracket the span are kept.
 */
const COVER_TOLERANCE_S = 1e-3;

export function inflowOnFitClock(
  series: FlowSeries,
  vessel: number,
  alignment: Alignment,
): InflowInput {
  const levelsAbsolute = alignment.t0EpochMs !== null;
  const flowAbsolute = series.t0EpochMs !== null;
  if (levelsAbsolute !== flowAbsolute) {
    throw new InputError(
      flowAbsolute
        ? 'the inflow log has timestamps while the level logs have elapsed time only, so it cannot be placed on their clock'
        : 'the inflow log has elapsed time only while the level logs have timestamps, so it cannot be placed on their clock',
      { file: series.fileName },
    );
  }
  // seconds to add to the flow log's own time to reach the fit's clock
  const shift = flowAbsolute
    ? (series.t0EpochMs! - alignment.t0EpochMs!) / 1000
    : -alignment.startS;
  const n = series.timeS.length;
  const first = series.timeS[0] + shift;
  const last = series.timeS[n - 1] + shift;
  const span = alignment.spanS;
  if (first > COVER_TOLERANCE_S || last < span - COVER_TOLERANCE_S) {
    const say = (t: number) =>
      flowAbsolute
        ? new Date(alignment.t0EpochMs! + t * 1000).toISOString()
        : `${(t + alignment.startS).toFixed(1)} s`;
    throw new InputError(
      `the inflow log covers ${say(first)} to ${say(last)} but the fitted span is ${say(0)} to ${say(span)}: the known inflow must be logged over the whole span (or fit a shorter --window)`,
      { file: series.fileName },
    );
  }
  let lo = 0;
  while (lo + 1 < n && series.timeS[lo + 1] + shift <= 0) lo++;
  let hi = n - 1;
  while (hi - 1 > lo && series.timeS[hi - 1] + shift >= span) hi--;
  return {
    vessel,
    timeS: Float64Array.from(series.timeS.subarray(lo, hi + 1), (t) => t + shift),
    flowM3S: series.flowM3S.slice(lo, hi + 1),
  };
}

/**
 * The time-average of a logged inflow over the fitted span [0, spanS], flow linear between readings
 * (as the ODE takes it): the exact integral of that broken line divided by the span. The workbench
 * starts its operating point from it (the steady state the logged pumping would hold on average).
 */
export function meanFlowOverSpan(
  timeS: ArrayLike<number>,
  flowM3S: ArrayLike<number>,
  spanS: number,
): number {
  const n = timeS.length;
  if (n === 0 || !(spanS > 0)) return n ? flowM3S[0] : 0;
  const at = (t: number) => {
    if (t <= timeS[0]) return flowM3S[0];
    for (let i = 1; i < n; i++)
      if (t <= timeS[i])
        return (
          flowM3S[i - 1] +
          ((flowM3S[i] - flowM3S[i - 1]) * (t - timeS[i - 1])) / (timeS[i] - timeS[i - 1] || 1)
        );
    return flowM3S[n - 1];
  };
  // breakpoints inside the span, plus both ends; trapezoids are exact on a broken line
  const ts = [0, ...Array.from(timeS).filter((t) => t > 0 && t < spanS), spanS];
  let area = 0;
  for (let i = 1; i < ts.length; i++)
    area += ((at(ts[i - 1]) + at(ts[i])) / 2) * (ts[i] - ts[i - 1]);
  return area / spanS;
}
