/**
 * The end of a drain: cut before the nearly empty part, where vortices, the outlet uncovering and
 * low-head effects change the flow.
 *
 * Nearly empty (outlet reading known): cut where the head, level − outlet reading, first falls
 * below `headFraction` of the head at the window's start.
 *
 * Flat end: cut where the fall rate drops for good below √headFraction of the initial rate (a
 * tenth of it when the outlet reading is known, since the head cut then handles the tail). For a free-draining outlet in a vertical cylinder the rate goes as √head, so this marks
 * the same head fraction without knowing the datum; in other shapes it still cuts a tail that
 * has gone flat (the valve shut, or the sensor at its floor). Rates are measured on block medians
 * across spans of 5 % of the window; the initial rate over its first 10 %.
 */
import { InputError } from '../errors.js';
import { decimate } from './decimate.js';
import type { WindowTrim } from './types.js';

export interface EndCut {
  endIndex: number;
  trims: WindowTrim[];
}

function firstIndexAtOrAfter(timeS: Float64Array, t: number, from: number, to: number): number {
  let lo = from;
  let hi = to;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (timeS[mid] < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export function cutEnd(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  startIndex: number,
  endIndex: number,
  headFraction: number,
  outletReadingM: number | undefined,
): EndCut {
  const trims: WindowTrim[] = [];
  const len = endIndex - startIndex + 1;
  const d = decimate(
    timeS,
    levelM,
    excluded,
    Math.max(1, Math.ceil(len / 2000)),
    startIndex,
    endIndex,
  );
  const t = d.timeS;
  const v = d.levelM;
  const m = v.length;
  if (m < 5) return { endIndex, trims };
  let end = endIndex;

  if (outletReadingM !== undefined) {
    const head0 = v[0] - outletReadingM;
    if (!(head0 > 0)) {
      throw new InputError(
        `the outlet reading ${outletReadingM.toFixed(4)} m is not below the level at the start of the drain ` +
          `(${v[0].toFixed(4)} m at ${t[0].toFixed(1)} s): check the outlet's elevation against the sensor's zero`,
        { field: 'outletReadingM' },
      );
    }
    const limit = outletReadingM + headFraction * head0;
    let j = 0;
    while (j < m && v[j] >= limit) j++;
    if (j < m && j > 0) {
      const cutIndex = Math.max(startIndex, d.lastIndex[j - 1]);
      if (cutIndex < end) {
        trims.push({
          what: 'nearly-empty',
          fromS: timeS[cutIndex],
          toS: timeS[end],
          reason:
            `the head fell below ${(headFraction * 100).toFixed(0)} % of its starting ${head0.toFixed(3)} m ` +
            `(level ${limit.toFixed(3)} m, outlet at ${outletReadingM.toFixed(3)} m) at ${timeS[cutIndex].toFixed(1)} s`,
        });
        end = cutIndex;
      }
    }
  }

  // Flat end, on the blocks up to the current end.
  let mEnd = m - 1;
  while (mEnd > 0 && d.firstIndex[mEnd] > end) mEnd--;
  const duration = t[mEnd] - t[0];
  if (mEnd >= 4 && duration > 0) {
    const i10 = Math.max(1, firstIndexAtOrAfter(t, t[0] + 0.1 * duration, 0, mEnd));
    const rate0 = (v[0] - v[i10]) / (t[i10] - t[0]);
    const w = Math.max(1, Math.round(0.025 * mEnd));
    // Outlet known: the head cut handles the free-draining tail, so only a real flattening (a tenth
    // of the initial rate: valve shut, outlet uncovered) cuts earlier.
    const fraction = outletReadingM === undefined ? Math.sqrt(headFraction) : 0.1;
    let lastFast = -1;
    for (let j = w; j + w <= mEnd; j++) {
      const rate = (v[j - w] - v[j + w]) / (t[j + w] - t[j - w]);
      if (rate >= fraction * rate0) lastFast = j;
    }
    if (rate0 > 0 && lastFast >= 0 && lastFast + w < mEnd) {
      const cutIndex = d.lastIndex[lastFast];
      if (cutIndex < end) {
        trims.push({
          what: 'flat-end',
          fromS: timeS[cutIndex],
          toS: timeS[end],
          reason:
            `the fall rate dropped below ${(fraction * 100).toFixed(0)} % of its initial ` +
            `${(rate0 * 1000).toFixed(2)} mm/s after ${timeS[cutIndex].toFixed(1)} s (the level flattens)`,
        });
        end = cutIndex;
      }
    }
  }
  return { endIndex: end, trims };
}
