/**
 * Every falling stretch of the log that could be a drain. Found on the decimated series:
 *  1. turning points with a hysteresis of the smallest drop worth listing, so wobbles and noise
 *     smaller than that never split a fall and never count as a rise;
 *  2. each fall is split again where the level holds (steady within the noise band for holdS and
 *     for 5 % of the fall's duration);
 *  3. each piece is trimmed to where it leaves the top (last block within the band of the top)
 *     and where it reaches the bottom (first block within the band of the bottom).
 */
import { decimate, defaultBlockSamples } from './decimate.js';
import { estimateNoise, estimateResolution } from './robust.js';
import type { CandidateOptions, DrainCandidate } from './types.js';

export interface CandidateScales {
  /** Band within which the level counts as steady, m. */
  bandM: number;
  /** Smallest fall listed, m. */
  minDropM: number;
  blockSamples: number;
}

/**
 * The noise-based scales findDrainCandidates uses (exposed so the chooser can explain them).
 * The steady band is 6 σ of the block medians (the range of a few dozen Gaussian readings stays
 * within about that) and at least two reading steps; the smallest fall listed is five bands and
 * at least ten raw σ.
 */
/** Scales a caller has already measured on the same readings and exclusions (saves passes). */
export interface KnownScales {
  /** estimateResolution(levelM). */
  resolutionM?: number;
  /** estimateNoise(levelM, excluded). */
  noiseM?: number;
}

export function candidateScales(
  levelM: Float64Array,
  excluded: Uint8Array | null | undefined,
  blockLevelM: Float64Array,
  blockSamples: number,
  options: CandidateOptions = {},
  known: KnownScales = {},
): CandidateScales {
  const q = known.resolutionM ?? estimateResolution(levelM);
  const sigmaRaw = known.noiseM ?? estimateNoise(levelM, excluded);
  const sigmaBlock = estimateNoise(blockLevelM);
  let big = 1;
  for (let i = 0; i < blockLevelM.length; i++) big = Math.max(big, Math.abs(blockLevelM[i]));
  const bandM = Math.max(6 * sigmaBlock, 2 * q, 1e-9 * big);
  const minDropM = options.minDropM ?? Math.max(5 * bandM, 10 * sigmaRaw);
  return { bandM, minDropM, blockSamples };
}

/** Turning points of v with hysteresis h: alternating highs and lows (block indices). */
function turningPoints(v: Float64Array, h: number): number[] {
  const pts: number[] = [];
  let dir = 0;
  let hiI = 0;
  let loI = 0;
  let ext = 0;
  for (let j = 1; j < v.length; j++) {
    if (dir === 0) {
      if (v[j] > v[hiI]) hiI = j;
      if (v[j] < v[loI]) loI = j;
      if (v[j] < v[hiI] - h) {
        pts.push(hiI);
        dir = -1;
        ext = j;
      } else if (v[j] > v[loI] + h) {
        pts.push(loI);
        dir = 1;
        ext = j;
      }
    } else if (dir < 0) {
      if (v[j] < v[ext]) ext = j;
      else if (v[j] > v[ext] + h) {
        pts.push(ext);
        dir = 1;
        ext = j;
      }
    } else {
      if (v[j] > v[ext]) ext = j;
      else if (v[j] < v[ext] - h) {
        pts.push(ext);
        dir = -1;
        ext = j;
      }
    }
  }
  if (dir !== 0) pts.push(ext);
  return pts;
}

/** Holds inside blocks [a, b]: stretches steady within `band` for at least holdS. */
function holdsWithin(
  t: Float64Array,
  v: Float64Array,
  a: number,
  b: number,
  band: number,
  holdS: number,
): [number, number][] {
  const holds: [number, number][] = [];
  let i = a;
  let hi = v[a];
  let lo = v[a];
  for (let j = a + 1; j <= b + 1; j++) {
    if (j <= b) {
      hi = Math.max(hi, v[j]);
      lo = Math.min(lo, v[j]);
      if (hi - lo <= band) continue;
    }
    if (t[j - 1] - t[i] >= holdS) holds.push([i, j - 1]);
    if (j <= b) {
      i = j;
      hi = lo = v[j];
    }
  }
  return holds;
}

export function findDrainCandidates(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded?: Uint8Array | null,
  options: CandidateOptions = {},
  known: KnownScales = {},
): DrainCandidate[] {
  const n = levelM.length;
  if (n < 3) return [];
  const holdS = options.holdS ?? 30;
  const d = decimate(timeS, levelM, excluded, options.blockSamples ?? defaultBlockSamples(n));
  const { bandM, minDropM } = candidateScales(
    levelM,
    excluded,
    d.levelM,
    d.blockSamples,
    options,
    known,
  );
  const t = d.timeS;
  const v = d.levelM;
  const pts = turningPoints(v, minDropM);
  const out: DrainCandidate[] = [];
  for (let p = 0; p + 1 < pts.length; p++) {
    const a = pts[p];
    const b = pts[p + 1];
    if (!(v[a] > v[b])) continue;
    // Pieces of the fall between holds.
    const pieces: [number, number][] = [];
    let from = a;
    // A hold must also last 5 % of the fall it interrupts, so a slow drain (a pond over a day) is
    // not chopped into 30 s pieces where the level moves less than the band.
    const minHold = Math.max(holdS, 0.05 * (t[b] - t[a]));
    for (const [ha, hb] of holdsWithin(t, v, a, b, bandM, minHold)) {
      if (ha > from) pieces.push([from, ha]);
      from = hb;
    }
    if (b > from) pieces.push([from, b]);
    for (const [pa, pb] of pieces) {
      let top = pa;
      let bottom = pa;
      for (let j = pa; j <= pb; j++) {
        if (v[j] > v[top]) top = j;
        if (v[j] < v[bottom]) bottom = j;
      }
      if (bottom <= top) continue;
      let s = top;
      while (s + 1 < bottom && v[s + 1] >= v[top] - bandM) s++;
      let e = s;
      while (e < bottom && v[e] > v[bottom] + bandM) e++;
      const drop = v[s] - v[e];
      if (!(drop >= minDropM) || e <= s) continue;
      const startIndex = d.firstIndex[s];
      const endIndex = d.firstIndex[e];
      out.push({
        startIndex,
        endIndex,
        startS: timeS[startIndex],
        endS: timeS[endIndex],
        startLevelM: v[s],
        endLevelM: v[e],
        dropM: drop,
        durationS: timeS[endIndex] - timeS[startIndex],
      });
    }
  }
  out.sort((x, y) => y.dropM - x.dropM || x.startIndex - y.startIndex);
  return out;
}
