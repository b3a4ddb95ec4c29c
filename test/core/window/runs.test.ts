import { describe, expect, it } from 'vitest';
import { findClipping, findFlatLines } from '../../../server/core/window/index.js';
import { simulate } from './simulate.js';

const base = (noiseM: number) =>
  simulate({
    startLevelM: 1.5,
    outletM: 0,
    dtS: 1,
    noiseM,
    stepM: 0.001,
    seed: 5,
    phases: [
      { kind: 'hold', durationS: 200 },
      { kind: 'drain', durationS: 800, k: Math.sqrt(1.5) / 600 },
    ],
  });

describe('findFlatLines', () => {
  it('finds a stuck sensor in mid-drain and nothing in the holds', () => {
    const { series } = base(0.001);
    const lv = series.levelM;
    lv.fill(lv[400], 400, 430); // stuck for 30 readings while falling ~3 mm/s
    const runs = findFlatLines(series.timeS, lv);
    expect(runs.map((r) => [r.startIndex, r.endIndex])).toEqual([[400, 429]]);
    expect(runs[0].reason).toMatch(/stuck/);
  });

  it('does not flag the long identical readings of a noise-free hold or an empty vessel', () => {
    const { series } = base(0);
    expect(findFlatLines(series.timeS, series.levelM)).toEqual([]);
  });
});

describe('findClipping', () => {
  it('finds readings pinned at the top and bottom of a sensor range on noisy data', () => {
    const { series } = base(0.002);
    const lv = series.levelM;
    for (let i = 0; i < lv.length; i++) lv[i] = Math.min(1.4, Math.max(0.2, lv[i]));
    const runs = findClipping(series.timeS, lv);
    const top = runs.filter((r) => r.side === 'max');
    const bottom = runs.filter((r) => r.side === 'min');
    expect(top.length).toBeGreaterThan(0);
    expect(top[0].startIndex).toBe(0);
    expect(bottom.length).toBeGreaterThan(0);
    expect(bottom[bottom.length - 1].endIndex).toBe(lv.length - 1);
  });

  it('flags nothing on an unclipped noisy log, nor on noise-free readings where a still extreme is a hold', () => {
    expect(findClipping(base(0.002).series.timeS, base(0.002).series.levelM)).toEqual([]);
    expect(findClipping(base(0).series.timeS, base(0).series.levelM)).toEqual([]);
  });
});
