/**
 * Robust scale helpers shared by the window detectors: a selection-based median (no full sort),
 * the reading resolution of a quantised logger, and the white-noise level of a series.
 */

/** 1.4826 turns a median absolute deviation into a standard deviation for Gaussian noise. */
export const MAD_TO_SIGMA = 1.4826;

/** k-th smallest of a[lo..hi] (inclusive), rearranging a in place (Hoare's selection). */
function select(a: Float64Array, lo: number, hi: number, k: number): number {
  while (hi > lo) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  // One exit after the loop: a second return inside it left the read after the loop without type
  // feedback, and V8 discarded the loop's compiled code there on almost every call.
  return a[k];
}

/** Median of the first `length` values of `scratch`; the scratch is reordered. */
export function medianInPlace(scratch: Float64Array, length = scratch.length): number {
  if (length === 0) return NaN;
  const mid = length >> 1;
  const upper = select(scratch, 0, length - 1, mid);
  if (length % 2 === 1) return upper;
  return (largestOf(scratch, mid) + upper) / 2;
}

/**
 * Largest of the first k values. A function of its own: with this loop inside medianInPlace, V8
 * compiled the loop on the fly (OSR) before the sum after it had run, and then threw that code
 * away on every even-length call (~1800 times for the end cut's blocks on an 86 400-reading log).
 */
function largestOf(a: Float64Array, k: number): number {
  let largest = -Infinity;
  for (let i = 0; i < k; i++) if (a[i] > largest) largest = a[i];
  return largest;
}

/**
 * The logger's reading step (e.g. 0.001 for 1 mm) when the readings sit on a grid, else 0.
 * Taken as the smallest clear step between consecutive readings, accepted only when nearly all
 * steps are whole multiples of it: continuous data has tiny steps that are not.
 */
export function estimateResolution(levelM: Float64Array): number {
  const n = levelM.length;
  const tiny = Math.max(farthestFromFirst(levelM) * 1e-9, 1e-12);
  const q = smallestStep(levelM, tiny);
  if (!Number.isFinite(q)) return 0;
  const stride = Math.max(1, Math.floor(n / 20000)); // a sample of steps is enough to judge
  const { steps, onGrid } = countOnGrid(levelM, tiny, q, stride);
  return steps > 0 && onGrid >= 0.95 * steps ? q : 0;
}

// estimateResolution's passes, each a small function (see secondDiffs below).

function farthestFromFirst(levelM: Float64Array): number {
  let range = 0;
  for (let i = 1; i < levelM.length; i++) {
    const d = Math.abs(levelM[i] - levelM[0]);
    if (d > range) range = d;
  }
  return range;
}

function smallestStep(levelM: Float64Array, tiny: number): number {
  let q = Infinity;
  for (let i = 1; i < levelM.length; i++) {
    const d = Math.abs(levelM[i] - levelM[i - 1]);
    if (d > tiny && d < q) q = d;
  }
  return q;
}

function countOnGrid(
  levelM: Float64Array,
  tiny: number,
  q: number,
  stride: number,
): { steps: number; onGrid: number } {
  let steps = 0;
  let onGrid = 0;
  for (let i = stride; i < levelM.length; i += stride) {
    const d = Math.abs(levelM[i] - levelM[i - 1]);
    if (d <= tiny) continue;
    steps++;
    const r = d / q;
    if (Math.abs(r - Math.round(r)) < 0.02) onGrid++;
  }
  return { steps, onGrid };
}

/**
 * Standard deviation of the white part of the noise, from the MAD of second differences:
 * a steady fall or a slowly curving drain cancels out, spikes do not move a median.
 * For white noise of σ, a second difference has variance 6σ².
 */
export function estimateNoise(levelM: Float64Array, excluded?: Uint8Array | null): number {
  const n = levelM.length;
  if (n < 3) return 0;
  const d = new Float64Array(n - 2);
  const m = excluded ? keptSecondDiffs(levelM, excluded, d) : secondDiffs(levelM, d);
  if (m === 0) return 0;
  return (MAD_TO_SIGMA * medianInPlace(d, m)) / Math.sqrt(6);
}

// The passes over every reading as small functions: in a fresh process the JIT takes them up
// early instead of running one big function's loops in the interpreter.

/** d = |second differences| of all readings; returns their count. */
function secondDiffs(levelM: Float64Array, d: Float64Array): number {
  const n = levelM.length;
  for (let i = 1; i < n - 1; i++)
    d[i - 1] = Math.abs(levelM[i + 1] - 2 * levelM[i] + levelM[i - 1]);
  return n - 2;
}

/** The same, leaving out any difference that touches a set-aside reading. */
function keptSecondDiffs(levelM: Float64Array, excluded: Uint8Array, d: Float64Array): number {
  const n = levelM.length;
  let m = 0;
  for (let i = 1; i < n - 1; i++) {
    if (excluded[i - 1] | excluded[i] | excluded[i + 1]) continue;
    d[m++] = Math.abs(levelM[i + 1] - 2 * levelM[i] + levelM[i - 1]);
  }
  return m;
}

/** Least-squares slope of level against time over included samples in [from, to]; NaN if < 2. */
export function slopeOver(
  timeS: Float64Array,
  levelM: Float64Array,
  from: number,
  to: number,
  excluded?: Uint8Array | null,
): number {
  const a = Math.max(0, from);
  const b = Math.min(to, timeS.length - 1);
  let n = 0;
  let st = 0;
  let sy = 0;
  for (let i = a; i <= b; i++) {
    if (excluded && excluded[i]) continue;
    n++;
    st += timeS[i];
    sy += levelM[i];
  }
  if (n < 2) return NaN;
  const tm = st / n;
  const ym = sy / n;
  let stt = 0;
  let sty = 0;
  for (let i = a; i <= b; i++) {
    if (excluded && excluded[i]) continue;
    const dt = timeS[i] - tm;
    stt += dt * dt;
    sty += dt * (levelM[i] - ym);
  }
  return stt > 0 ? sty / stt : NaN;
}
