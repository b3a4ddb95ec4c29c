/**
 * When the valve opened, from the readings around it.
 *
 * 1. The hold: walking back from the fall's start while blocks of readings stay near the level
 *    just before it (within 5 % of the fall, 8 σ and two reading steps), so a fill or an earlier
 *    drain is not taken for the hold. Its level is the median of all of it and its scatter the
 *    scaled MAD about that median: both from the hold itself, so noise that is larger or smaller
 *    in the hold than in the drain, correlated (AR(1)) or slowly wandering sets the band, not the
 *    white noise of the whole log.
 * 2. The level leaves the hold's band (4 scatters below its level) for good at the reading after
 *    the last one inside it.
 * 3. A hinge fit: level = hold level before t0, and hold level − r·τ − c·τ² after (τ = t − t0; the
 *    closed form of a draining cylinder is exactly quadratic, and a short stretch of any drain
 *    nearly so), each side weighted by its own scatter, over the hold and the first stretch of
 *    the fall. t0 is scanned continuously (8 points between samples) over the stretch where the
 *    opening can lie, either side of the crossing; the least weighted sum of squares wins.
 * A "hold" that falls at a fifth of the drain's first rate or more is no hold: the log starts
 * already falling.
 */
import { medianInPlace, MAD_TO_SIGMA, slopeOver } from './robust.js';

export interface Onset {
  index: number;
  timeS: number;
  holdLevelM: number;
  /** Robust scatter of the hold's readings about its level, m. */
  holdScatterM: number;
  /** Readings the hold level was taken from (0 when the log starts falling). */
  holdSamples: number;
}

interface HoldStats {
  level: number;
  scatter: number;
  count: number;
}

function holdStats(
  levelM: Float64Array,
  excluded: Uint8Array,
  a: number,
  b: number,
  floor: number,
): HoldStats {
  const s = new Float64Array(b - a + 1);
  let k = 0;
  for (let i = a; i <= b; i++) if (!excluded[i]) s[k++] = levelM[i];
  if (k === 0) return { level: NaN, scatter: floor, count: 0 };
  const level = medianInPlace(s, k);
  for (let i = 0; i < k; i++) s[i] = Math.abs(s[i] - level);
  const scatter = Math.max(MAD_TO_SIGMA * medianInPlace(s, k), floor);
  return { level, scatter, count: k };
}

/** First index of the hold that ends at `end`: blocks of 10 readings whose median stays within tol of ref. */
function holdStart(
  levelM: Float64Array,
  excluded: Uint8Array,
  earliest: number,
  end: number,
  ref: number,
  tol: number,
): number {
  const block = new Float64Array(10);
  let start = end;
  for (let b = end; b > earliest; b -= 10) {
    const a = Math.max(earliest, b - 9);
    let k = 0;
    for (let i = a; i <= b; i++) if (!excluded[i]) block[k++] = levelM[i];
    if (k > 0 && Math.abs(medianInPlace(block, k) - ref) > tol) break;
    start = a;
  }
  return start;
}

/** Index after the last kept reading in [from, to] at or above `limit`; from when none. */
function leavesBand(
  levelM: Float64Array,
  excluded: Uint8Array,
  from: number,
  to: number,
  limit: number,
): number {
  let last = from - 1;
  for (let i = from; i <= to; i++) if (!excluded[i] && levelM[i] >= limit) last = i;
  return Math.min(last + 1, to);
}

export function findOnset(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  candidateStart: number,
  candidateEnd: number,
  earliest: number,
  noiseM: number,
  resolutionM: number,
  dropM: number,
): Onset {
  const floor = Math.max(
    0.5 * noiseM,
    0.3 * resolutionM,
    1e-9 * Math.abs(levelM[candidateStart]) + 1e-12,
  );
  const falling = (i: number): Onset => ({
    index: i,
    timeS: timeS[i],
    holdLevelM: levelM[i],
    holdScatterM: 0,
    holdSamples: 0,
  });
  // The level just before the fall (or, when the fall's start is found inside the hold near the
  // log's start, the first readings).
  const nearTo =
    candidateStart - earliest >= 5 ? candidateStart : Math.min(candidateEnd, earliest + 29);
  const near = holdStats(levelM, excluded, Math.max(earliest, nearTo - 30), nearTo, floor);
  if (near.count < 5) return falling(candidateStart);
  const tol = Math.max(0.05 * dropM, 8 * noiseM, 2 * resolutionM);
  const hs = holdStart(levelM, excluded, earliest, nearTo, near.level, tol);
  // The hold, then again over the readings up to where the level leaves its band (the fall's
  // start from the decimated series may lie a little before or after the opening).
  let hold = holdStats(levelM, excluded, hs, nearTo, floor);
  let cross = leavesBand(levelM, excluded, hs, candidateEnd, hold.level - 4 * hold.scatter);
  hold = holdStats(levelM, excluded, hs, Math.max(hs, cross - 1), floor);
  cross = leavesBand(levelM, excluded, hs, candidateEnd, hold.level - 4 * hold.scatter);
  if (hold.count < 5 || cross - hs < 5)
    return falling(Math.max(hs, Math.min(cross, candidateStart)));

  // The first stretch of the fall: max(10 s, 20 samples, 5 % of the drain).
  const dt = (timeS[candidateEnd] - timeS[hs]) / Math.max(1, candidateEnd - hs);
  const span = Math.max(10, 20 * dt, 0.05 * (timeS[candidateEnd] - timeS[cross]));
  let fitEnd = cross;
  while (fitEnd < candidateEnd && timeS[fitEnd + 1] <= timeS[cross] + span) fitEnd++;
  const rate = -slopeOver(timeS, levelM, cross, fitEnd, excluded);
  // A hold does not trend: when the "hold" falls at a fifth of the drain's first rate or more,
  // the log starts already falling.
  const holdRate = -slopeOver(timeS, levelM, hs, cross - 1, excluded);
  if (!(holdRate < 0.2 * rate)) return falling(hs);
  // Where the opening can lie: either side of the crossing by twice the time the initial fall
  // needs to cross the band, and at least 20 samples and 10 s (a correlated dip in the hold can
  // put the crossing early, a wandering hold late); forward no deeper than 12 scatters.
  const back = Math.max(rate > 0 ? (8 * hold.scatter) / rate : Infinity, 20 * dt, 10);
  let lo = cross;
  while (lo > hs + 1 && timeS[lo - 1] >= timeS[cross] - back) lo--;
  let hi = cross;
  const deep = hold.level - 12 * hold.scatter;
  while (
    hi < fitEnd - 5 &&
    timeS[hi + 1] <= timeS[cross] + back &&
    !(levelM[hi] < deep && !excluded[hi])
  )
    hi++;
  const t0 = hingeFit(timeS, levelM, excluded, hs, lo, hi, cross, fitEnd, hold);
  let index = lo;
  while (index < hi && timeS[index] < t0) index++;
  return {
    index,
    timeS: t0,
    holdLevelM: hold.level,
    holdScatterM: hold.scatter,
    holdSamples: hold.count,
  };
}

/**
 * The hinge time minimising the weighted sum of squares (see the file's head), with t0 in
 * (t[lo−1], t[hi]]. Sums over the fall's side come from suffix sums in u = t − t[cross],
 * expanded in t0, so each trial costs a few operations.
 */
function hingeFit(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  hs: number,
  lo: number,
  hi: number,
  cross: number,
  fitEnd: number,
  hold: HoldStats,
): number {
  const h = hold.level;
  const tr = timeS[cross];
  const m = fitEnd - lo + 2;
  // suffix sums from index lo + j to fitEnd: S0..S4 of u, P0..P2 of u^k·y', Q of y'²
  const S = new Float64Array(5 * m);
  const P = new Float64Array(3 * m);
  const Q = new Float64Array(m);
  for (let j = m - 2; j >= 0; j--) {
    const i = lo + j;
    for (let k = 0; k < 5; k++) S[5 * j + k] = S[5 * (j + 1) + k];
    for (let k = 0; k < 3; k++) P[3 * j + k] = P[3 * (j + 1) + k];
    Q[j] = Q[j + 1];
    if (excluded[i]) continue;
    const u = timeS[i] - tr;
    const y = levelM[i] - h;
    let p = 1;
    for (let k = 0; k < 5; k++) {
      S[5 * j + k] += p;
      if (k < 3) P[3 * j + k] += p * y;
      p *= u;
    }
    Q[j] += y * y;
  }
  // before-side sums of y'² from hs to each index (exclusive)
  let before = 0;
  for (let i = hs; i < lo; i++) if (!excluded[i]) before += (levelM[i] - h) ** 2;
  // the fall's own scatter: the residual RMS of the fit hinged at the crossing's sample before
  const afterSse = (j: number, u0: number): number => {
    const s0 = S[5 * j],
      s1 = S[5 * j + 1],
      s2 = S[5 * j + 2],
      s3 = S[5 * j + 3],
      s4 = S[5 * j + 4];
    const p0 = P[3 * j],
      p1 = P[3 * j + 1],
      p2 = P[3 * j + 2];
    const a11 = s2 - 2 * u0 * s1 + u0 * u0 * s0;
    const a12 = s3 - 3 * u0 * s2 + 3 * u0 * u0 * s1 - u0 ** 3 * s0;
    const a22 = s4 - 4 * u0 * s3 + 6 * u0 * u0 * s2 - 4 * u0 ** 3 * s1 + u0 ** 4 * s0;
    const b1 = p1 - u0 * p0;
    const b2 = p2 - 2 * u0 * p1 + u0 * u0 * p0;
    const det = a11 * a22 - a12 * a12;
    if (!(det > 0)) return Q[j];
    const c1 = (a22 * b1 - a12 * b2) / det;
    const c2 = (a11 * b2 - a12 * b1) / det;
    return Math.max(0, Q[j] - c1 * b1 - c2 * b2);
  };
  const jc = cross - lo;
  const nAfter = S[5 * jc];
  const sd = Math.max(
    Math.sqrt(afterSse(jc, timeS[cross - 1] - tr) / Math.max(1, nAfter - 2)),
    hold.scatter * 1e-3,
  );
  const wh = 1 / (hold.scatter * hold.scatter);
  const wd = 1 / (sd * sd);
  let bestT = timeS[cross];
  let best = Infinity;
  for (let i = lo; i <= hi; i++) {
    const j = i - lo;
    const ta = timeS[i - 1];
    const tb = timeS[i];
    for (let q = 1; q <= 8; q++) {
      const t0 = ta + ((tb - ta) * q) / 8;
      const cost = wh * before + wd * afterSse(j, t0 - tr);
      if (cost < best) {
        best = cost;
        bestT = t0;
      }
    }
    if (!excluded[i]) before += (levelM[i] - h) ** 2;
  }
  return bestT;
}
