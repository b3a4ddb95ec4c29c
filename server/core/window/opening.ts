/**
 * How much of the drain's start to skip: the opening transient, judged from the data, with no
 * fixed cap. Two rules; the later of the two (and at least `minTrimS`) wins.
 *
 * Wobble rule: cut the series after the onset into chunks of max(4 s, 8 sample intervals) and
 * fit a line to each. The transient has settled at the first chunk from which three chunks in a
 * row have a residual RMS no more than 2.5 times the typical chunk RMS of the drain's body (20 %
 * to 60 % of its duration).
 *
 * Still-opening rule (physics): once the valve is fully open the outflow can only fall as the
 * head falls, so the fall rate relative to the head model — rate × area(reading) / √head when
 * the outlet and the vessel are known, rate × area without the outlet, the bare rate without
 * either — is steady or shrinking. Chunks of max(8 samples, 1/40 of the drain) each give a rate
 * and its standard error from a line fit; the valve is taken as open from the first chunk that no
 * later chunk in the first 80 % of the drain exceeds by more than 3 combined standard errors,
 * and the trim runs to the end of the chunk after it (the ramp's last part is within the noise of
 * full flow, so it may end a chunk later).
 */
import type { Onset } from './onset.js';
import { MAD_TO_SIGMA, medianInPlace, slopeOver } from './robust.js';

export interface OpeningTrim {
  /** Seconds skipped after the onset. */
  trimS: number;
  /** Seconds after the onset by which the wobble had died down. */
  wobbleS: number;
  /** Seconds after the onset by which the outflow had stopped growing (0 when it never grew). */
  openingS: number;
  /** The trim as a share of the drain from the onset to the candidate's end. */
  share: number;
  reason: string;
}

export interface TrimContext {
  minTrimS: number;
  resolutionM: number;
  /** Outlet elevation as a reading, when known. */
  outletReadingM?: number;
  /** Plan area at a reading, m², when the vessel is known. */
  areaAtReadingM2?: (readingM: number) => number;
}

/** The last index in [a, endIndex] from which the next sample is still before tEnd (a at least). */
function lastBefore(timeS: Float64Array, a: number, endIndex: number, tEnd: number): number {
  let b = a;
  while (b + 1 <= endIndex && timeS[b + 1] < tEnd) b++;
  return b;
}

function chunkRms(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  a: number,
  b: number,
): number {
  const s = slopeOver(timeS, levelM, a, b, excluded);
  if (!Number.isFinite(s)) return NaN;
  let n = 0;
  let tm = 0;
  let ym = 0;
  for (let i = a; i <= b; i++) if (!excluded[i]) n++, (tm += timeS[i]), (ym += levelM[i]);
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

/** Least-squares line over kept samples in [a, b]: slope, its standard error and the mean level. */
function lineFit(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  a: number,
  b: number,
): { slope: number; se: number; meanM: number } {
  let n = 0,
    tm = 0,
    ym = 0;
  for (let i = a; i <= b; i++) if (!excluded[i]) n++, (tm += timeS[i]), (ym += levelM[i]);
  if (n < 3) return { slope: NaN, se: NaN, meanM: NaN };
  tm /= n;
  ym /= n;
  let stt = 0,
    sty = 0;
  for (let i = a; i <= b; i++) {
    if (excluded[i]) continue;
    stt += (timeS[i] - tm) ** 2;
    sty += (timeS[i] - tm) * (levelM[i] - ym);
  }
  const slope = sty / stt;
  let ss = 0;
  for (let i = a; i <= b; i++)
    if (!excluded[i]) ss += (levelM[i] - ym - slope * (timeS[i] - tm)) ** 2;
  return { slope, se: Math.sqrt(ss / (n - 2) / stt), meanM: ym };
}

/** Seconds after the onset by which the outflow, relative to the head model, had stopped growing. */
function stillOpeningS(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  onset: Onset,
  endIndex: number,
  ctx: TrimContext,
): number {
  const t0 = onset.timeS;
  const duration = timeS[endIndex] - t0;
  const dt = duration / Math.max(1, endIndex - onset.index);
  const chunkS = Math.max(8 * dt, duration / 40);
  const rate: number[] = [];
  const rateSe: number[] = [];
  const scales: number[] = [];
  let a = onset.index;
  for (let c = 0; a <= endIndex && c * chunkS < 0.8 * duration; c++) {
    const b = lastBefore(timeS, a, endIndex, t0 + (c + 1) * chunkS);
    const f = lineFit(timeS, levelM, excluded, a, b);
    let scale = ctx.areaAtReadingM2 ? ctx.areaAtReadingM2(f.meanM) : 1;
    if (ctx.outletReadingM !== undefined) {
      const head = f.meanM - ctx.outletReadingM;
      scale = head > 0 ? scale / Math.sqrt(head) : NaN;
    }
    rate.push(-f.slope);
    rateSe.push(f.se);
    scales.push(scale);
    a = b + 1;
  }
  // Correlated noise makes a line fit's standard error too small: the scatter of consecutive
  // chunk rates about each other (scaled MAD of their differences / √2) is the floor, in rate
  // units before the head model's scaling (which grows as the head falls).
  const diffs = new Float64Array(Math.max(0, rate.length - 1));
  let m = 0;
  for (let c = 1; c < rate.length; c++)
    if (Number.isFinite(rate[c]) && Number.isFinite(rate[c - 1]))
      diffs[m++] = Math.abs(rate[c] - rate[c - 1]);
  const seFloor = m >= 4 ? (MAD_TO_SIGMA * medianInPlace(diffs, m)) / Math.SQRT2 : 0;
  const k = rate.map((r, c) => r * scales[c]);
  const se = rateSe.map((e, c) => Math.max(e, seFloor) * Math.abs(scales[c]));
  for (let c = 0; c < k.length; c++) {
    if (!Number.isFinite(k[c])) continue;
    let open = true;
    for (let j = c + 1; j < k.length && open; j++) {
      if (Number.isFinite(k[j]) && k[j] > k[c] + 3 * Math.hypot(se[c], se[j])) open = false;
    }
    // the last stretch of a ramp is within the noise of full flow: one chunk more
    if (open) return c === 0 ? 0 : (c + 2) * chunkS;
  }
  return 0;
}

export function openingTrim(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  onset: Onset,
  endIndex: number,
  ctx: TrimContext,
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
  const body = rms.slice(
    Math.floor(0.2 * rms.length),
    Math.max(Math.floor(0.2 * rms.length) + 1, Math.ceil(0.6 * rms.length)),
  );
  const finite = Float64Array.from(body.filter(Number.isFinite));
  const ref = finite.length ? medianInPlace(finite) : 0;
  const limit = 2.5 * ref + 0.1 * ctx.resolutionM + 1e-12;
  let settled = rms.length;
  for (let c = 0; c + 2 < rms.length; c++) {
    if (rms[c] <= limit && rms[c + 1] <= limit && rms[c + 2] <= limit) {
      settled = c;
      break;
    }
  }
  const wobbleS = settled * chunkS;
  const openingS = stillOpeningS(timeS, levelM, excluded, onset, endIndex, ctx);
  const trimS = Math.max(wobbleS, openingS, ctx.minTrimS);
  const why =
    openingS >= wobbleS && openingS > ctx.minTrimS
      ? `the outflow kept growing against the head model (the valve was still opening) until about ${openingS.toFixed(1)} s after opening`
      : wobbleS > ctx.minTrimS
        ? `the wobble after opening died down by ${wobbleS.toFixed(1)} s after opening (chunks of ${chunkS.toFixed(1)} s fit a line within 2.5× the drain's usual scatter)`
        : `the level settled quickly, so the shortest trim is used while the outflow develops`;
  return {
    trimS,
    wobbleS,
    openingS,
    share: duration > 0 ? trimS / duration : 1,
    reason: `valve opened at about ${t0.toFixed(1)} s; ${why}`,
  };
}
