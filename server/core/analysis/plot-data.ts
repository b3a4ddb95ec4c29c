/**
 * Points for drawing only (never for fitting): at most `max` points, keeping each bucket's
 * lowest and highest reading so spikes and the window's edges stay visible.
 */
export function decimateForDrawing(
  timeS: ArrayLike<number>,
  values: ArrayLike<number>,
  max: number,
): { timeS: number[]; values: number[] } {
  const n = timeS.length;
  if (n <= max) return { timeS: Array.from(timeS), values: Array.from(values) };
  const buckets = Math.max(1, Math.floor(max / 2));
  const t: number[] = [];
  const v: number[] = [];
  for (let b = 0; b < buckets; b++) {
    const from = Math.floor((b * n) / buckets);
    const to = Math.floor(((b + 1) * n) / buckets);
    let iMin = from;
    let iMax = from;
    for (let i = from; i < to; i++) {
      if (values[i] < values[iMin]) iMin = i;
      if (values[i] > values[iMax]) iMax = i;
    }
    const [a, c] = iMin < iMax ? [iMin, iMax] : [iMax, iMin];
    t.push(timeS[a]);
    v.push(values[a]);
    if (c !== a) {
      t.push(timeS[c]);
      v.push(values[c]);
    }
  }
  return { timeS: t, values: v };
}
