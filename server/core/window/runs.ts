/**
 * Runs of readings a fit should not see: a sensor stuck on one value while the level moves
 * (flat line), and a sensor pinned at the end of its range (clipping).
 */
import { estimateNoise, estimateResolution, slopeOver } from './robust.js';
import type { ClippingOptions, ClippingRun, FlatLineOptions, SampleRun } from './types.js';

/** Maximal runs [start, end] of identical readings at least minSamples long. */
function identicalRuns(
  levelM: Float64Array,
  minSamples: number,
  accept: (v: number) => boolean,
): [number, number][] {
  const runs: [number, number][] = [];
  const n = levelM.length;
  let a = 0;
  for (let i = 1; i <= n; i++) {
    if (i < n && levelM[i] === levelM[a]) continue;
    if (i - a >= minSamples && accept(levelM[a])) runs.push([a, i - 1]);
    a = i;
  }
  return runs;
}

function extremes(levelM: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < levelM.length; i++) {
    if (levelM[i] < lo) lo = levelM[i];
    if (levelM[i] > hi) hi = levelM[i];
  }
  return [lo, hi];
}

function run(
  timeS: Float64Array,
  levelM: Float64Array,
  a: number,
  b: number,
  reason: string,
): SampleRun {
  return {
    startIndex: a,
    endIndex: b,
    startS: timeS[a],
    endS: timeS[b],
    samples: b - a + 1,
    levelM: levelM[a],
    reason,
  };
}

const mm = (m: number) => `${(m * 1000).toFixed(1)} mm`;

/**
 * Identical readings that last far longer than the level's movement allows: the level falls (or
 * rises) at a clear rate just before and just after the run, in the same direction, and at that
 * rate it would have moved by more than `factor` reading steps (or noise σ) during the run.
 * Holds are not flagged: on both sides of a hold the rate is about zero.
 */
export function findFlatLines(
  timeS: Float64Array,
  levelM: Float64Array,
  options: FlatLineOptions = {},
): SampleRun[] {
  const minSamples = options.minSamples ?? 10;
  const factor = options.factor ?? 5;
  const q = options.resolutionM ?? estimateResolution(levelM);
  const unit = Math.max(q, options.noiseM ?? estimateNoise(levelM, options.excluded), 1e-12);
  const out: SampleRun[] = [];
  for (const [a, b] of identicalRuns(levelM, minSamples, () => true)) {
    const side = Math.max(minSamples, 10);
    if (a - side < 0 || b + side >= levelM.length) continue; // no level movement to judge against
    const before = slopeOver(timeS, levelM, a - side, a - 1, options.excluded);
    const after = slopeOver(timeS, levelM, b + 1, b + side, options.excluded);
    if (
      !Number.isFinite(before) ||
      !Number.isFinite(after) ||
      Math.sign(before) !== Math.sign(after)
    )
      continue;
    const rate = Math.min(Math.abs(before), Math.abs(after));
    const duration = timeS[b] - timeS[a];
    const expected = rate * duration;
    if (expected <= factor * unit) continue;
    out.push(
      run(
        timeS,
        levelM,
        a,
        b,
        `${b - a + 1} identical readings of ${levelM[a].toFixed(4)} m over ${duration.toFixed(1)} s while the level ` +
          `was ${before < 0 ? 'falling' : 'rising'} at about ${mm(rate)}/s on both sides (it should have moved ${mm(expected)}): ` +
          'the sensor looks stuck',
      ),
    );
  }
  return out;
}

/**
 * Runs of identical readings at the series' highest or lowest value. Judged only when the rest of
 * the log shows noise of at least one reading step (rounding alone looks like
 * about half a step of noise): real readings then jitter, so a perfectly
 * still run at the very extreme is the sensor at the end of its range. With noise-free readings
 * a still run at the extreme is an ordinary hold (or an empty vessel) and is not flagged.
 */
export function findClipping(
  timeS: Float64Array,
  levelM: Float64Array,
  options: ClippingOptions = {},
): ClippingRun[] {
  const n = levelM.length;
  if (n < 3) return [];
  const minSamples = options.minSamples ?? 5;
  const q = options.resolutionM ?? estimateResolution(levelM);
  const [lo, hi] = options.rangeM ?? extremes(levelM);
  if (hi === lo) return [];
  const runs = identicalRuns(levelM, minSamples, (v) => v === hi || v === lo);
  if (runs.length === 0) return [];
  // Noise away from the pinned runs.
  const pinned = new Uint8Array(n);
  for (const [a, b] of runs) pinned.fill(1, a, b + 1);
  const sigma = estimateNoise(levelM, pinned);
  if (!(sigma >= q) || sigma === 0) return [];
  return runs.map(([a, b]) => {
    const side = levelM[a] === hi ? 'max' : 'min';
    const r = run(
      timeS,
      levelM,
      a,
      b,
      `${b - a + 1} identical readings at the ${side === 'max' ? 'highest' : 'lowest'} value of the log ` +
        `(${levelM[a].toFixed(4)} m) from ${timeS[a].toFixed(1)} s to ${timeS[b].toFixed(1)} s, where elsewhere ` +
        `readings jitter by about ${mm(sigma)}: the sensor looks pinned at the end of its range`,
    );
    return { ...r, side };
  });
}
