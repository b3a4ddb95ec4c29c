import { describe, expect, it } from 'vitest';
import { findSpikes } from '../../../server/core/window/index.js';
import { movingMedian } from '../../../server/core/window/spikes.js';
import { simulate } from './simulate.js';

const drain = (noiseM: number, spikes: [number, number][] = [], seed = 1) =>
  simulate({
    startLevelM: 1.5,
    outletM: 0,
    dtS: 1,
    noiseM,
    stepM: 0.001,
    seed,
    spikes,
    phases: [
      { kind: 'hold', durationS: 200 },
      { kind: 'drain', durationS: 800, k: Math.sqrt(1.5) / 600 },
    ],
  });

describe('movingMedian', () => {
  it('matches a brute-force median of each window (sorting each window afresh)', () => {
    const x = new Float64Array(200).map((_, i) => Math.sin(i * 1.7) * 3 + (i % 7));
    const k = 4;
    const got = movingMedian(x, k);
    for (let c = k; c < x.length - k; c++) {
      const w = Array.from(x.slice(c - k, c + k + 1)).sort((a, b) => a - b);
      expect(got[c]).toBe(w[k]);
    }
  });
});

describe('findSpikes', () => {
  it('finds no spikes in clean 1 mm-quantised data, holds and drain alike (MAD of 0 floored at the step)', () => {
    const { series } = drain(0);
    expect(Array.from(findSpikes(series.timeS, series.levelM))).toEqual([]);
  });

  it('finds isolated and paired spikes on the drain and the hold', () => {
    const spikes: [number, number][] = [
      [50, 0.08],
      [300, -0.05],
      [301, -0.06],
      [500, 0.2],
      [650, -0.03],
    ];
    const { series, truth } = drain(0, spikes);
    expect(Array.from(findSpikes(series.timeS, series.levelM))).toEqual(truth.spikeIndices);
  });

  it('on noisy data finds every spike and flags ordinary readings no more often than the normal tail allows', () => {
    const spikes: [number, number][] = [
      [50, 0.08],
      [300, -0.05],
      [301, -0.06],
      [500, 0.2],
      [650, -0.03],
    ];
    const { series, truth } = drain(0.0015, spikes, 7);
    const found = new Set(findSpikes(series.timeS, series.levelM));
    for (const i of truth.spikeIndices) expect(found.has(i)).toBe(true);
    const falseAlarms = [...found].filter((i) => !truth.spikeIndices.includes(i)).length;
    // Two-sided normal tail beyond 3.5 σ is 4.65e-4 (standard normal table); the median's own
    // scatter widens it somewhat, so allow four times that rate.
    expect(falseAlarms).toBeLessThanOrEqual(Math.ceil(4 * 4.65e-4 * series.levelM.length));
  });

  it('refuses a bad window or threshold', () => {
    const { series } = drain(0);
    expect(() => findSpikes(series.timeS, series.levelM, { halfWindow: 0 })).toThrow(/half-window/);
    expect(() => findSpikes(series.timeS, series.levelM, { threshold: -1 })).toThrow(/threshold/);
    expect(() => findSpikes(series.timeS.subarray(1), series.levelM)).toThrow(/lengths/);
  });
});
