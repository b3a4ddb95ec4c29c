/**
 * The start of a drain: when the valve opened, and how much of the opening transient to skip.
 *
 * Onset: the level of the hold before the fall is the median of up to `holdSamples` readings
 * before the candidate's start; the fall is confirmed at the first reading that, with the next
 * two, lies more than max(3 σ, 1.5 reading steps) below it; the onset is put earlier by the time
 * the initial fall rate needs to cover that margin.
 *
 * Transient rule: cut the series after the onset into chunks of max(4 s, 8 sample intervals) and
 * fit a line to each. The transient has settled at the first chunk from which three chunks in a
 * row have a residual RMS no more than 2.5 times the typical chunk RMS of the drain's body (20 %
 * to 60 % of its duration). The trim lasts at least `minTrimS` (the flow develops over the first
 * seconds even when no wobble shows) and at most `maxFraction` of the drain's duration (so a log
 * that never settles still keeps most of its drain; that case is warned about).
 */
import { medianInPlace, slopeOver } from './robust.js';

export interface Onset {
  index: number;
  timeS: number;
  holdLevelM: number;
  /** Readings the hold level was taken from (0 when the log starts falling). */
  holdSamples: number;
}

export function findOnset(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  candidateStart: number,
  candidateEnd: number,
  earliest: number,
  marginM: number,
  holdSamples = 30,
): Onset {
  const from = Math.max(earliest, candidateStart - holdSamples);
  const scratch = new Float64Array(candidateStart - from + 1);
  let k = 0;
  for (let i = from; i <= candidateStart; i++) if (!excluded[i]) scratch[k++] = levelM[i];
  if (k === 0) return { index: candidateStart, timeS: timeS[candidateStart], holdLevelM: levelM[candidateStart], holdSamples: 0 };
  const hold = medianInPlace(scratch, k);
  const below = hold - marginM;
  let cross = -1;
  for (let i = Math.max(from, 0); i <= candidateEnd && cross < 0; i++) {
    if (excluded[i] || levelM[i] >= below) continue;
    let ok = true;
    let seen = 0;
    for (let j = i + 1; j <= candidateEnd && seen < 2; j++) {
      if (excluded[j]) continue;
      seen++;
      if (levelM[j] >= below) ok = false;
    }
    if (ok) cross = i;
  }
  if (cross < 0) cross = candidateStart;
  // Initial fall rate over max(10 s, 5 % of the drain) after the crossing.
  const span = Math.max(10, 0.05 * (timeS[candidateEnd] - timeS[cross]));
  let to = cross;
  while (to < candidateEnd && timeS[to] < timeS[cross] + span) to++;
  const rate = -slopeOver(timeS, levelM, cross, to, excluded);
  let t = timeS[cross];
  if (rate > 0) t = Math.max(timeS[from], t - marginM / rate);
  let index = cross;
  while (index > from && timeS[index - 1] >= t) index--;
  return { index, timeS: t, holdLevelM: hold, holdSamples: k };
}

export interface OpeningTrim {
  /** Seconds skipped after the onset. */
  trimS: number;
  /** Seconds after the onset at which the transient was judged settled (may exceed trimS when capped). */
  settledS: number;
  capped: boolean;
  reason: string;
}

/** The last index in [a, endIndex] from which the next sample is still before tEnd (a at least). */
function lastBefore(timeS: Float64Array, a: number, endIndex: number, tEnd: number): number {
  let b = a;
  while (b + 1 <= endIndex && timeS[b + 1] < tEnd) b++;
  return b;
}

function chunkRms(timeS: Float64Array, levelM: Float64Array, excluded: Uint8Array, a: number, b: number): number {
  const s = slopeOver(timeS, levelM, a, b, excluded);
  if (!Number.isFinite(s)) return NaN;
  let n = 0;
  let tm = 0;
  let ym = 0;
  for (let i = a; i <= b; i++) if (!excluded[i]) (n++, (tm += timeS[i]), (ym += levelM[i]));
  tm /= n;
  ym /= n;
  let ss = 0;
  for (let i = a; i <= b; i++) {
    if (excluded[i]) continue;
    const r = levelM[i] - ym - s * (timeS[i] - tm);
    ss += r * r;
  }
  return Math.sqrt(ss / n);
}

export function openingTrim(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  onset: Onset,
  endIndex: number,
  minTrimS: number,
  maxFraction: number,
  resolutionM: number,
): OpeningTrim {
  const t0 = onset.timeS;
  const duration = timeS[endIndex] - t0;
  const dt = duration / Math.max(1, endIndex - onset.index);
  const chunkS = Math.max(4, 8 * dt);
  // Chunk boundaries as index ranges.
  const rms: number[] = [];
  let a = onset.index;
  for (let c = 0; a <= endIndex; c++) {
    const tEnd = t0 + (c + 1) * chunkS;
    const b = lastBefore(timeS, a, endIndex, tEnd);
    rms.push(b - a >= 2 ? chunkRms(timeS, levelM, excluded, a, b) : NaN);
    a = b + 1;
  }
  const body = rms.slice(Math.floor(0.2 * rms.length), Math.max(Math.floor(0.2 * rms.length) + 1, Math.ceil(0.6 * rms.length)));
  const finite = Float64Array.from(body.filter(Number.isFinite));
  const ref = finite.length ? medianInPlace(finite) : 0;
  const limit = 2.5 * ref + 0.1 * resolutionM + 1e-12;
  let settled = rms.length;
  for (let c = 0; c + 2 < rms.length; c++) {
    if (rms[c] <= limit && rms[c + 1] <= limit && rms[c + 2] <= limit) {
      settled = c;
      break;
    }
  }
  const settledS = settled * chunkS;
  const cap = maxFraction * duration;
  const trimS = Math.min(Math.max(settledS, minTrimS), cap);
  const capped = settledS > cap;
  const why = capped
    ? `the level had not settled ${cap.toFixed(1)} s after opening (${(maxFraction * 100).toFixed(0)} % of the drain), so the trim stops there`
    : settledS > minTrimS
      ? `the wobble after opening died down by ${settledS.toFixed(1)} s after opening (chunks of ${chunkS.toFixed(1)} s fit a line within 2.5× the drain's usual scatter)`
      : `the level settled quickly, so the shortest trim of ${minTrimS.toFixed(1)} s is used while the outflow develops`;
  return { trimS, settledS, capped, reason: `valve opened at about ${t0.toFixed(1)} s; ${why}` };
}
