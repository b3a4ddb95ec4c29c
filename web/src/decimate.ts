/**
 * Points for drawing only — a fit always uses every sample. Each bucket keeps its lowest and
 * highest reading (spikes and the edges of a drain stay visible); a gap in the log (an interval
 * over five median intervals, as the reader counts gaps) becomes a `null` so the line breaks there.
 */
export interface Drawn {
  x: number[];
  y: (number | null)[];
}

export function medianStep(t: ArrayLike<number>): number {
  const n = t.length;
  if (n < 2) return 0;
  const stride = Math.max(1, Math.floor(n / 2000)); // a sample of intervals is enough for a median
  const d: number[] = [];
  for (let i = 1; i < n; i += stride) d.push(t[i] - t[i - 1]);
  d.sort((a, b) => a - b);
  return d[Math.floor(d.length / 2)];
}

export function decimate(t: ArrayLike<number>, y: ArrayLike<number>, maxPoints: number): Drawn {
  const n = t.length;
  const gap = 5 * medianStep(t);
  const out: Drawn = { x: [], y: [] };
  // segments between gaps, each drawn with its share of the points
  let from = 0;
  const segments: [number, number][] = [];
  for (let i = 1; i <= n; i++) {
    if (i === n || (gap > 0 && t[i] - t[i - 1] > gap)) {
      segments.push([from, i]);
      from = i;
    }
  }
  for (const [a, b] of segments) {
    const len = b - a;
    const buckets = Math.max(1, Math.floor(((maxPoints / 2) * len) / Math.max(1, n)));
    if (len <= buckets * 2) {
      for (let i = a; i < b; i++) {
        out.x.push(t[i]);
        out.y.push(y[i]);
      }
    } else {
      for (let k = 0; k < buckets; k++) {
        const lo = a + Math.floor((k * len) / buckets);
        const hi = a + Math.floor(((k + 1) * len) / buckets);
        let iMin = lo,
          iMax = lo;
        for (let i = lo; i < hi; i++) {
          if (y[i] < y[iMin]) iMin = i;
          if (y[i] > y[iMax]) iMax = i;
        }
        const first = Math.min(iMin, iMax),
          second = Math.max(iMin, iMax);
        out.x.push(t[first]);
        out.y.push(y[first]);
        if (second !== first) {
          out.x.push(t[second]);
          out.y.push(y[second]);
        }
      }
    }
    if (b < n) {
      // a point in the gap with no value: uPlot breaks the line there
      out.x.push((t[b - 1] + t[b]) / 2);
      out.y.push(null);
    }
  }
  return out;
}
