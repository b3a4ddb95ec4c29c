/**
 * A shorter, steadier copy of the series for finding shapes: the median of each block of
 * consecutive samples (set-aside samples left out), at the mean time of the samples used.
 */
import { medianInPlace } from './robust.js';

export interface Decimated {
  timeS: Float64Array;
  levelM: Float64Array;
  /** First and last raw index used in each block. */
  firstIndex: Int32Array;
  lastIndex: Int32Array;
  blockSamples: number;
}

/**
 * Default block: at most about 10 000 blocks over the log, and at least 5 samples a block once the
 * log has 1000 samples or more (a median of 5 already tames the noise); short logs keep more detail.
 */
export function defaultBlockSamples(n: number): number {
  return Math.max(Math.ceil(n / 10000), Math.min(5, Math.floor(n / 200)), 1);
}

export function decimate(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array | null | undefined,
  blockSamples: number,
  from = 0,
  to = levelM.length - 1,
): Decimated {
  const B = Math.max(1, Math.floor(blockSamples));
  const blocks = Math.ceil((to - from + 1) / B);
  const t = new Float64Array(blocks);
  const v = new Float64Array(blocks);
  const first = new Int32Array(blocks);
  const last = new Int32Array(blocks);
  const scratch = new Float64Array(B);
  const out: BlockOut = { t, v, first, last };
  let m = 0;
  for (let a = from; a <= to; a += B) {
    if (
      excluded
        ? keptBlock(timeS, levelM, excluded, a, Math.min(a + B - 1, to), scratch, out, m)
        : wholeBlock(timeS, levelM, a, Math.min(a + B - 1, to), scratch, out, m)
    )
      m++;
  }
  return {
    timeS: t.subarray(0, m),
    levelM: v.subarray(0, m),
    firstIndex: first.subarray(0, m),
    lastIndex: last.subarray(0, m),
    blockSamples: B,
  };
}

interface BlockOut {
  t: Float64Array;
  v: Float64Array;
  first: Int32Array;
  last: Int32Array;
}

// One block each, as small functions the JIT takes up early (called once per block).

/** Block [a, b] with every reading kept into out[m]. */
function wholeBlock(
  timeS: Float64Array,
  levelM: Float64Array,
  a: number,
  b: number,
  scratch: Float64Array,
  out: BlockOut,
  m: number,
): boolean {
  let k = 0;
  let st = 0;
  for (let i = a; i <= b; i++) {
    scratch[k++] = levelM[i];
    st += timeS[i];
  }
  out.t[m] = st / k;
  out.v[m] = blockMedian(scratch, k);
  out.first[m] = a;
  out.last[m] = b;
  return true;
}

/** Block [a, b] without its set-aside readings into out[m]; false when none is left. */
function keptBlock(
  timeS: Float64Array,
  levelM: Float64Array,
  excluded: Uint8Array,
  a: number,
  b: number,
  scratch: Float64Array,
  out: BlockOut,
  m: number,
): boolean {
  let k = 0;
  let st = 0;
  let f = -1;
  let l = -1;
  for (let i = a; i <= b; i++) {
    if (excluded[i]) continue;
    scratch[k++] = levelM[i];
    st += timeS[i];
    if (f < 0) f = i;
    l = i;
  }
  if (k === 0) return false;
  out.t[m] = st / k;
  out.v[m] = blockMedian(scratch, k);
  out.first[m] = f;
  out.last[m] = l;
  return true;
}

function blockMedian(scratch: Float64Array, k: number): number {
  return k === 1 ? scratch[0] : k <= 16 ? smallMedian(scratch, k) : medianInPlace(scratch, k);
}

/** Median of the first k (≤ 16) values by insertion sort: cheaper than selection for a few values. */
function smallMedian(a: Float64Array, k: number): number {
  for (let i = 1; i < k; i++) {
    const v = a[i];
    let j = i - 1;
    while (j >= 0 && a[j] > v) (a[j + 1] = a[j]), j--;
    a[j + 1] = v;
  }
  const mid = k >> 1;
  return k % 2 === 1 ? a[mid] : (a[mid - 1] + a[mid]) / 2;
}
