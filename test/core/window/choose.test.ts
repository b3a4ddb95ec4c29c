import { describe, expect, it } from 'vitest';
import { chooseDrainWindow, findDrainCandidates } from '../../../server/core/window/index.js';
import { simulate, timeAtHeadFraction } from './simulate.js';

const OUTLET = 0.05;
const k = Math.sqrt(1.45) / 600; // empties 1.45 m of head in 600 s

/** Hold, one drain with an 8 s wobble at opening, noise 1.5 mm, 1 mm steps, spikes. */
const single = () =>
  simulate({
    startLevelM: 1.5,
    outletM: OUTLET,
    noiseM: 0.0015,
    stepM: 0.001,
    seed: 3,
    phases: [
      { kind: 'hold', durationS: 120 },
      { kind: 'drain', durationS: 900, k, wobbleM: 0.01, wobbleS: 8 },
    ],
    spikes: [
      [50, 0.08],
      [300, -0.05],
      [301, -0.06],
      [500, 0.2],
    ],
  });

/** Fill, hold, drain (valve shut at 0.5 m), hold, drain to empty, hold. */
const cycles = () =>
  simulate({
    startLevelM: 0.3,
    outletM: OUTLET,
    noiseM: 0.0015,
    stepM: 0.001,
    seed: 11,
    phases: [
      { kind: 'hold', durationS: 60 },
      { kind: 'fill', durationS: 300, toLevelM: 1.5 },
      { kind: 'hold', durationS: 120 },
      { kind: 'drain', durationS: 250, k, wobbleM: 0.008, wobbleS: 6 },
      { kind: 'hold', durationS: 150 },
      { kind: 'drain', durationS: 700, k, wobbleM: 0.008, wobbleS: 6 },
    ],
  });

const headAt = (levelTrue: Float64Array, i: number) => levelTrue[i] - OUTLET;

describe('findDrainCandidates', () => {
  it('lists both drains of a fill–hold–drain–hold–drain log, largest first, and not the fill', () => {
    const { series, truth } = cycles();
    const c = findDrainCandidates(series.timeS, series.levelM, null);
    expect(c.length).toBe(2);
    const [first, second] = truth.drains;
    // The first drain (1.5 → about 0.5 m) falls further than the second (about 0.5 m → outlet).
    expect(c[0].startS).toBeGreaterThanOrEqual(first.openS - 5);
    expect(c[0].startS).toBeLessThanOrEqual(first.openS + 5);
    expect(c[1].startS).toBeGreaterThanOrEqual(second.openS - 5);
    expect(c[0].dropM).toBeGreaterThan(c[1].dropM);
    expect(c[0].endS).toBeLessThanOrEqual(first.shutS + 5);
  });

  it('finds nothing in a log that only holds with noise', () => {
    const { series } = simulate({
      startLevelM: 1,
      outletM: 0,
      noiseM: 0.002,
      stepM: 0.001,
      phases: [{ kind: 'hold', durationS: 2000 }],
    });
    expect(findDrainCandidates(series.timeS, series.levelM, null)).toEqual([]);
  });
});

describe('chooseDrainWindow', () => {
  it('starts within a few seconds after opening, past the wobble, and ends before 5 % head (outlet known)', () => {
    const { series, truth } = single();
    const d = truth.drains[0];
    const r = chooseDrainWindow(series, { outletReadingM: OUTLET });
    expect(r.window.startS).toBeGreaterThanOrEqual(d.openS + d.wobbleS * 0.75);
    expect(r.window.startS).toBeLessThanOrEqual(d.openS + 15);
    const h0 = headAt(truth.trueLevelM, r.window.startIndex);
    // The rule cuts at 5 % of the starting head; one reading's noise (1.5 mm) is small beside 1 % (14 mm).
    expect(headAt(truth.trueLevelM, r.window.endIndex)).toBeGreaterThanOrEqual(0.04 * h0);
    expect(r.window.endS).toBeLessThanOrEqual(d.openS + timeAtHeadFraction(d, 0.04));
    expect(r.trims.map((t) => t.what)).toContain('valve-opening');
    expect(r.trims.map((t) => t.what)).toContain('nearly-empty');
    for (const t of r.trims) expect(t.reason.length).toBeGreaterThan(20);
  });

  it('without the outlet reading cuts the flat tail near the same head', () => {
    const { series, truth } = single();
    const r = chooseDrainWindow(series);
    const h0 = headAt(truth.trueLevelM, r.window.startIndex);
    const hEnd = headAt(truth.trueLevelM, r.window.endIndex);
    // Rate ∝ √head for this cylinder: the √5 % rate cut aims at 5 % head; rates are read over
    // spans of 5 % of the window, so allow 2–10 %.
    expect(hEnd).toBeGreaterThanOrEqual(0.02 * h0);
    expect(hEnd).toBeLessThanOrEqual(0.1 * h0);
    expect(r.trims.map((t) => t.what)).toContain('flat-end');
    expect(r.notes.map((n) => n.code)).toContain('outlet-unknown');
  });

  it('lists spikes with their source lines and leaves them out of keep', () => {
    const { series, truth } = single();
    const r = chooseDrainWindow(series, { outletReadingM: OUTLET });
    expect(r.spikes.map((s) => s.index)).toEqual(truth.spikeIndices);
    expect(r.spikes[0].line).toBe(series.sourceLine[truth.spikeIndices[0]]);
    for (const i of truth.spikeIndices) expect(r.keep[i]).toBe(0);
    let kept = 0;
    for (let i = 0; i < r.keep.length; i++) {
      if (r.keep[i]) {
        kept++;
        expect(i >= r.window.startIndex && i <= r.window.endIndex).toBe(true);
      }
    }
    const spikesInside = truth.spikeIndices.filter(
      (i) => i >= r.window.startIndex && i <= r.window.endIndex,
    ).length;
    expect(kept).toBe(r.window.samples - spikesInside);
  });

  it('uses the largest of several drains and names the other in the notes', () => {
    const { series, truth } = cycles();
    const r = chooseDrainWindow(series, { outletReadingM: OUTLET });
    const first = truth.drains[0];
    expect(r.window.startS).toBeGreaterThanOrEqual(first.openS);
    expect(r.window.startS).toBeLessThanOrEqual(first.openS + 15);
    expect(r.window.endS).toBeLessThanOrEqual(first.shutS);
    expect(r.notes.filter((n) => n.code === 'other-drain').length).toBe(1);
  });

  it('honours a window given by a person', () => {
    const { series } = single();
    const r = chooseDrainWindow(series, { window: { startS: 200.5, endS: 400 } });
    expect(r.window.startS).toBe(201);
    expect(r.window.endS).toBe(400);
    expect(r.trims).toEqual([]);
    expect(r.notes.map((n) => n.code)).toContain('window-chosen-by-user');
  });

  it('refuses a window outside the log, a reversed one, or one too short', () => {
    const { series } = single();
    expect(() => chooseDrainWindow(series, { window: { startS: -5, endS: 100 } })).toThrow(
      /outside the log/,
    );
    expect(() => chooseDrainWindow(series, { window: { startS: 500, endS: 5000 } })).toThrow(
      /outside the log/,
    );
    expect(() => chooseDrainWindow(series, { window: { startS: 300, endS: 200 } })).toThrow(
      /start before its end/,
    );
    expect(() => chooseDrainWindow(series, { window: { startS: 200, endS: 205 } })).toThrow(
      /only \d+ usable readings/,
    );
  });

  it('refuses a log that never falls, a constant signal, too few readings, and bad times', () => {
    const hold = simulate({
      startLevelM: 1,
      outletM: 0,
      noiseM: 0.002,
      stepM: 0.001,
      phases: [{ kind: 'hold', durationS: 1000 }],
    }).series;
    expect(() => chooseDrainWindow(hold)).toThrow(
      /never falls by more than .* is this a drain test/,
    );
    const flat = { ...hold, levelM: new Float64Array(hold.levelM.length).fill(0.8) };
    expect(() => chooseDrainWindow(flat)).toThrow(/throughout/);
    const short = {
      timeS: hold.timeS.subarray(0, 8),
      levelM: hold.levelM.subarray(0, 8),
      sourceLine: hold.sourceLine.subarray(0, 8),
    };
    expect(() => chooseDrainWindow(short)).toThrow(/only 8 readings/);
    const back = { ...hold, timeS: Float64Array.from(hold.timeS) };
    back.timeS[10] = back.timeS[9];
    expect(() => chooseDrainWindow(back)).toThrow(/increase/);
  });

  it('refuses an outlet reading above the level at the start of the drain', () => {
    const { series } = single();
    expect(() => chooseDrainWindow(series, { outletReadingM: 2 })).toThrow(/outlet reading/);
  });
});
