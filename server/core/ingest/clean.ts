/**
 * Putting samples in time order: out-of-order rows sorted, repeated timestamps dropped,
 * gaps found. Works in place on the collected arrays.
 */
import { GAP_FACTOR } from './options.js';

export interface Columns {
  n: number;
  timeMs: Float64Array;
  value: Float64Array;
  temp: Float64Array | null;
  line: Int32Array;
}

/** Stable sort of all columns by time. */
export function sortByTime(c: Columns): void {
  const idx = new Uint32Array(c.n);
  for (let i = 0; i < c.n; i++) idx[i] = i;
  const t = c.timeMs;
  idx.sort((a, b) => t[a] - t[b] || a - b);
  const permute = <A extends Float64Array | Int32Array>(arr: A): void => {
    const copy = arr.slice(0, c.n);
    for (let i = 0; i < c.n; i++) arr[i] = copy[idx[i]];
  };
  permute(c.timeMs);
  permute(c.value);
  if (c.temp) permute(c.temp);
  permute(c.line);
}

/** Drops rows whose time equals the previous row's; counts exact copies and conflicts apart. */
export function dropRepeats(c: Columns): { copies: number; conflicts: number; firstLine: number } {
  let w = 0,
    copies = 0,
    conflicts = 0,
    firstLine = 0;
  for (let i = 0; i < c.n; i++) {
    if (w > 0 && c.timeMs[i] === c.timeMs[w - 1]) {
      if (c.value[i] === c.value[w - 1]) copies++;
      else conflicts++;
      if (!firstLine) firstLine = c.line[i];
      continue;
    }
    if (w !== i) {
      c.timeMs[w] = c.timeMs[i];
      c.value[w] = c.value[i];
      if (c.temp) c.temp[w] = c.temp[i];
      c.line[w] = c.line[i];
    }
    w++;
  }
  c.n = w;
  return { copies, conflicts, firstLine };
}

/** k-th smallest of a (modified in place), Hoare quickselect. */
function select(a: Float64Array, k: number): number {
  let lo = 0,
    hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo,
      j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const x = a[i];
        a[i] = a[j];
        a[j] = x;
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

/** Median of the intervals between successive times (times ascending, n ≥ 2). */
export function medianInterval(t: ArrayLike<number>, n = t.length): number {
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = t[i] - t[i - 1];
  const m = d.length;
  if (m % 2) return select(d, (m - 1) / 2);
  const hi = select(d, m / 2);
  let lo = -Infinity;
  for (let i = 0; i < m / 2; i++) if (d[i] > lo) lo = d[i];
  return (lo + hi) / 2;
}

export interface Gap {
  /** Index of the sample before the gap. */
  after: number;
  startS: number;
  endS: number;
}

/** Intervals longer than GAP_FACTOR median intervals. */
export function findGaps(timeS: ArrayLike<number>, median = medianInterval(timeS)): Gap[] {
  const gaps: Gap[] = [];
  const limit = GAP_FACTOR * median;
  for (let i = 1; i < timeS.length; i++) {
    if (timeS[i] - timeS[i - 1] > limit)
      gaps.push({ after: i - 1, startS: timeS[i - 1], endS: timeS[i] });
  }
  return gaps;
}
