/**
 * Spikes by a Hampel filter: a reading is a spike when it sits further from the moving median than
 * `threshold` scaled MADs. It runs on the readings with the local trend taken out (see below). The MAD is taken of the residuals about the moving median (itself a
 * moving median of |reading − moving median|), not of the raw readings in the window: on a steady
 * fall the raw window spreads with the slope, which would hide spikes exactly where the drain is,
 * while the residuals hold only noise and spikes.
 *
 * Both moving medians keep their window sorted as it slides (one removal and one insertion per
 * step), so nothing is sorted afresh per sample.
 */
import { InputError } from '../errors.js';
import { estimateNoise, estimateResolution, MAD_TO_SIGMA } from './robust.js';
import type { SpikeOptions } from './types.js';

/**
 * Moving median over windows of L = min(2k+1, n) samples; samples nearer an end than half a
 * window take the median of the first or last full window.
 */
export function movingMedian(x: Float64Array, k: number): Float64Array {
  const n = x.length;
  const out = new Float64Array(n);
  if (n === 0) return out;
  const L = Math.min(2 * k + 1, n);
  const half = L >> 1;
  const s = new Float64Array(L);
  for (let i = 0; i < L; i++) s[i] = x[i];
  s.sort();
  const odd = L % 2 === 1;
  const lastCentre = n - L + half;
  for (let c = half; c <= lastCentre; c++) {
    if (c > half) slide(s, x[c - half - 1], x[c + L - 1 - half]);
    out[c] = odd ? s[half] : (s[half - 1] + s[half]) / 2;
  }
  out.fill(out[half], 0, half);
  out.fill(out[lastCentre], lastCentre + 1, n);
  return out;
}

/**
 * One step of the sorted window s: `gone` leaves, `come` enters. A small function called once
 * per sample, so V8 optimises it after a few hundred samples (the loop around it would need
 * on-the-fly compilation first).
 */
function slide(s: Float64Array, gone: number, come: number): void {
  const L = s.length;
  let lo = 0;
  let hi = L - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (s[mid] < gone) lo = mid + 1;
    else hi = mid - 1;
  }
  let p = lo; // first slot holding `gone`: overwrite it, shifting towards where `come` belongs
  if (come >= gone) {
    while (p + 1 < L && s[p + 1] < come) (s[p] = s[p + 1]), p++;
  } else {
    while (p > 0 && s[p - 1] > come) (s[p] = s[p - 1]), p--;
  }
  s[p] = come;
}

/** Indices (ascending) of the readings the Hampel filter calls spikes. */
export function findSpikes(
  timeS: Float64Array,
  levelM: Float64Array,
  options: SpikeOptions = {},
): Int32Array {
  const n = levelM.length;
  if (timeS.length !== n) {
    throw new InputError(`time and level have different lengths (${timeS.length} and ${n})`, {
      field: 'levelM',
    });
  }
  const k = options.halfWindow ?? 5;
  const threshold = options.threshold ?? 3.5;
  if (!Number.isInteger(k) || k < 1)
    throw new InputError('the spike half-window must be a whole number of samples ≥ 1', {
      field: 'halfWindow',
    });
  if (!(threshold > 0))
    throw new InputError('the spike threshold must be a positive number of scaled MADs', {
      field: 'threshold',
    });
  if (n < 3) return new Int32Array(0);
  // Floor on the scale: with 1 mm steps the MAD is often exactly 0, and a scale of 0 would flag
  // every step; the white-noise level keeps quiet windows from flagging ordinary noise.
  const floor = options.scaleFloorM ?? Math.max(estimateResolution(levelM), estimateNoise(levelM));
  // Take out the local fall first: integrate a moving median of the reading-to-reading rate (a
  // spike spoils only two of its 4k+1 rates) and subtract it. Without this, a steep fall spreads
  // the window by the slope, and a pair of spikes shifts the median by a whole slope step.
  const z = new Float64Array(n);
  if (n > 1) detrend(timeS, levelM, movingMedian(rates(timeS, levelM), 2 * k), z);
  const med = movingMedian(z, k);
  const dev = new Float64Array(n);
  // A reading within threshold·floor of its median is never a spike, whatever the MAD, so the
  // moving MAD is needed only at the few readings beyond that: each takes the median of its own
  // window (the same windows movingMedian uses), not a slide over the whole series.
  // (When the floor is 0 or tiny and most readings pass the bar, the slide is cheaper again.)
  const out: number[] = [];
  const L = Math.min(2 * k + 1, n);
  const half = L >> 1;
  const bar = threshold * floor;
  const beyond = deviations(z, med, bar, dev);
  if (beyond > n / 16) {
    const mad = movingMedian(dev, k);
    for (let i = 0; i < n; i++)
      if (dev[i] > threshold * Math.max(MAD_TO_SIGMA * mad[i], floor)) out.push(i);
    return Int32Array.from(out);
  }
  const window = new Float64Array(L);
  for (let i = nextBeyond(dev, bar, 0); i < n; i = nextBeyond(dev, bar, i + 1)) {
    const from = Math.min(Math.max(i - half, 0), n - L);
    window.set(dev.subarray(from, from + L));
    window.sort();
    const mad = L % 2 === 1 ? window[half] : (window[half - 1] + window[half]) / 2;
    if (dev[i] > threshold * Math.max(MAD_TO_SIGMA * mad, floor)) out.push(i);
  }
  return Int32Array.from(out);
}

/** The first index from i on with dev above bar (dev.length when none). */
function nextBeyond(dev: Float64Array, bar: number, i: number): number {
  while (i < dev.length && !(dev[i] > bar)) i++;
  return i;
}

// The passes over every reading, as small functions the JIT takes up early in a fresh process.

/** Reading-to-reading rates (length n − 1). */
function rates(timeS: Float64Array, levelM: Float64Array): Float64Array {
  const n = levelM.length;
  const rate = new Float64Array(n - 1);
  for (let i = 0; i + 1 < n; i++) rate[i] = (levelM[i + 1] - levelM[i]) / (timeS[i + 1] - timeS[i]);
  return rate;
}

/** z = readings minus the integral of the smoothed rate (z[0] = the first reading). */
function detrend(
  timeS: Float64Array,
  levelM: Float64Array,
  smooth: Float64Array,
  z: Float64Array,
): void {
  let trend = 0;
  z[0] = levelM[0];
  for (let i = 1; i < levelM.length; i++) {
    trend += smooth[i - 1] * (timeS[i] - timeS[i - 1]);
    z[i] = levelM[i] - trend;
  }
}

/** dev = |z − med|; returns how many exceed bar. */
function deviations(z: Float64Array, med: Float64Array, bar: number, dev: Float64Array): number {
  let beyond = 0;
  for (let i = 0; i < z.length; i++) {
    const d = Math.abs(z[i] - med[i]);
    dev[i] = d;
    if (d > bar) beyond++;
  }
  return beyond;
}
