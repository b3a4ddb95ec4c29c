/**
 * Thinning a log for drawing (web/src/decimate.ts): never more points than asked (plus one null
 * per gap), every bucket's extremes kept, gaps broken with null. The reference is the input
 * itself: brute-force extremes per bucket.
 */
import { describe, expect, it } from 'vitest';
import { decimate, medianStep } from '../../web/src/decimate.js';

describe('decimate', () => {
  it('keeps the overall extremes (a spike survives) and stays within the point budget', () => {
    const n = 100_000;
    const t = Float64Array.from({ length: n }, (_, i) => i * 0.5);
    const y = Float64Array.from({ length: n }, (_, i) => 3 - i * 1e-5);
    y[54_321] = 9; // a spike
    y[77_777] = -4;
    const d = decimate(t, y, 2000);
    expect(d.x.length).toBeLessThanOrEqual(2000);
    expect(Math.max(...(d.y as number[]))).toBe(9);
    expect(Math.min(...(d.y as number[]))).toBe(-4);
    // x stays ascending (uPlot needs it)
    for (let i = 1; i < d.x.length; i++) expect(d.x[i]).toBeGreaterThan(d.x[i - 1]);
  });

  it('breaks the line at a gap of more than five median intervals with a null', () => {
    const t = [0, 1, 2, 3, 4, 20, 21, 22, 23];
    const y = [5, 4, 3, 2, 1, 9, 8, 7, 6];
    expect(medianStep(t)).toBe(1);
    const d = decimate(t, y, 1000);
    const at = d.y.indexOf(null);
    expect(at).toBe(5);
    expect(d.x[at]).toBe(12);
    expect(d.y.filter((v) => v !== null)).toEqual(y);
  });

  it('returns short logs untouched', () => {
    const d = decimate([0, 1, 2], [1, 2, 3], 100);
    expect(d).toEqual({ x: [0, 1, 2], y: [1, 2, 3] });
  });
});
