/**
 * From a cleaned level log to the stretch a fit should use: set aside spikes, stuck and clipped
 * readings; list every falling stretch; take the largest; trim the valve-opening transient and the
 * nearly empty end; or honour a window a person chose. Every choice is explained in plain words.
 */
import { InputError } from '../errors.js';
import type { LevelSeries } from '../ingest/series.js';
import { candidateScales, findDrainCandidates } from './candidates.js';
import { decimate, defaultBlockSamples } from './decimate.js';
import { cutEnd } from './ending.js';
import { findOnset } from './onset.js';
import { openingTrim } from './opening.js';
import { estimateNoise, estimateResolution } from './robust.js';
import { findClipping, findFlatLines } from './runs.js';
import { findSpikes } from './spikes.js';
import type {
  DrainCandidate,
  WindowChoice,
  WindowNote,
  WindowOptions,
  WindowTrim,
} from './types.js';
import { countText } from '../format/words.js';

const s1 = (t: number) => `${t.toFixed(1)} s`;
const m3 = (m: number) => `${m.toFixed(3)} m`;

function checkInput(
  series: Pick<LevelSeries, 'timeS' | 'levelM' | 'sourceLine'>,
  minSamples: number,
): void {
  const { timeS, levelM, sourceLine } = series;
  const n = levelM.length;
  if (timeS.length !== n || sourceLine.length !== n) {
    throw new InputError(
      `time, level and line arrays differ in length (${timeS.length}, ${n}, ${sourceLine.length})`,
      { field: 'levelM' },
    );
  }
  if (n < Math.max(minSamples, 20)) {
    throw new InputError(
      `the log has only ${n} readings; a drain window needs at least ${Math.max(minSamples, 20)}`,
      { field: 'levelM' },
    );
  }
  const bad = firstUnfit(timeS, levelM);
  if (bad < 0) return;
  if (!Number.isFinite(levelM[bad]) || !Number.isFinite(timeS[bad])) {
    throw new InputError('reading is not a finite number', {
      line: sourceLine[bad],
      field: Number.isFinite(timeS[bad]) ? 'level' : 'time',
    });
  }
  throw new InputError('times must increase from one reading to the next', {
    line: sourceLine[bad],
    field: 'time',
  });
}

// The passes over every reading are small functions of their own, so that in a fresh process
// the JIT takes them up at once instead of compiling the whole chooser first.

/** The first reading that is not finite or not later than the one before; -1 when none. */
function firstUnfit(timeS: Float64Array, levelM: Float64Array): number {
  for (let i = 0; i < levelM.length; i++) {
    if (!Number.isFinite(levelM[i]) || !Number.isFinite(timeS[i])) return i;
    if (i > 0 && !(timeS[i] > timeS[i - 1])) return i;
  }
  return -1;
}

/** [min, max] of the readings. */
function range(levelM: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  // comparisons, not Math.min/max: no call per reading before the JIT has compiled this (the
  // readings are finite here, so the two agree)
  for (let i = 0; i < levelM.length; i++) {
    const v = levelM[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return [lo, hi];
}

/** keep[i] = 1 for the readings in [from, to] not set aside; returns how many. */
function markKept(excluded: Uint8Array, from: number, to: number, keep: Uint8Array): number {
  let kept = 0;
  for (let i = from; i <= to; i++) if (!excluded[i]) (keep[i] = 1), kept++;
  return kept;
}

function candidateLine(c: DrainCandidate): string {
  return `${s1(c.startS)} to ${s1(c.endS)}, falling ${m3(c.dropM)} (${m3(c.startLevelM)} to ${m3(c.endLevelM)})`;
}

export function chooseDrainWindow(
  series: Pick<LevelSeries, 'timeS' | 'levelM' | 'sourceLine'>,
  options: WindowOptions = {},
): WindowChoice {
  const minSamples = options.minSamples ?? 10;
  checkInput(series, minSamples);
  const { timeS, levelM, sourceLine } = series;
  const n = levelM.length;
  const notes: WindowNote[] = [];
  const warnings: WindowNote[] = [];
  const trims: WindowTrim[] = [];
  const headFraction = options.headFraction ?? 0.05;
  if (!(headFraction > 0 && headFraction < 1))
    throw new InputError('headFraction must lie between 0 and 1', { field: 'headFraction' });

  const [lo, hi] = range(levelM);
  if (hi === lo) {
    throw new InputError(
      `the level reads ${lo} m throughout: the sensor did not respond, or the file's level column is wrong`,
      { field: 'level' },
    );
  }

  // 1. Readings to set aside.
  const q = estimateResolution(levelM);
  // The noise of all readings, measured once: the spike filter's default floor, and (while
  // nothing is set aside) the noise the stuck-run test and the candidates need as well.
  const noiseAll = options.spikes?.scaleFloorM === undefined ? estimateNoise(levelM) : NaN;
  const spikeIdx = findSpikes(timeS, levelM, {
    ...options.spikes,
    scaleFloorM: options.spikes?.scaleFloorM ?? Math.max(q, noiseAll),
  });
  const excluded = new Uint8Array(n);
  for (const i of spikeIdx) excluded[i] = 1;
  const clipping = findClipping(timeS, levelM, { resolutionM: q, rangeM: [lo, hi] });
  for (const r of clipping) excluded.fill(1, r.startIndex, r.endIndex + 1);
  // With nothing set aside the noise of the kept readings is the noise of all (the same numbers
  // in the same order); otherwise measured once here for the stuck-run test and reused below.
  const noiseKept =
    spikeIdx.length === 0 && clipping.length === 0 && noiseAll === noiseAll
      ? noiseAll
      : estimateNoise(levelM, excluded);
  const flatLines = findFlatLines(timeS, levelM, { resolutionM: q, excluded, noiseM: noiseKept });
  for (const r of flatLines) excluded.fill(1, r.startIndex, r.endIndex + 1);
  const spikes = Array.from(spikeIdx, (i) => ({
    index: i,
    line: sourceLine[i],
    timeS: timeS[i],
    levelM: levelM[i],
  }));
  if (q > 0)
    notes.push({
      code: 'resolution',
      message: `readings come in steps of ${(q * 1000).toPrecision(3)} mm`,
    });
  if (spikes.length)
    notes.push({
      code: 'spikes',
      message: `${countText(spikes.length, 'reading')} ${spikes.length === 1 ? 'stands' : 'stand'} out from their neighbours (moving median test) and are left out`,
    });
  for (const r of clipping) warnings.push({ code: 'clipping', message: r.reason });
  for (const r of flatLines) warnings.push({ code: 'flat-line', message: r.reason });

  // 2. Falling stretches.
  // the white noise of the readings left in, measured once for the candidates and the onset
  const sigma = flatLines.length ? estimateNoise(levelM, excluded) : noiseKept;
  const candidates = findDrainCandidates(timeS, levelM, excluded, options.candidates, {
    resolutionM: q,
    noiseM: sigma,
  });

  let startIndex: number;
  let endIndex: number;
  if (options.window) {
    const { startS, endS } = options.window;
    if (!Number.isFinite(startS) || !Number.isFinite(endS) || !(endS > startS)) {
      throw new InputError(
        `the window must have a start before its end (got ${startS} s to ${endS} s)`,
        { field: 'window' },
      );
    }
    if (startS < timeS[0] || endS > timeS[n - 1]) {
      throw new InputError(
        `the window ${s1(startS)} to ${s1(endS)} reaches outside the log, which runs from ${s1(timeS[0])} to ${s1(timeS[n - 1])}`,
        { field: 'window' },
      );
    }
    startIndex = 0;
    while (timeS[startIndex] < startS) startIndex++;
    endIndex = n - 1;
    while (timeS[endIndex] > endS) endIndex--;
    notes.push({
      code: 'window-chosen-by-user',
      message: `the window ${s1(startS)} to ${s1(endS)} was given; no automatic trims applied`,
    });
    if (candidates.length === 0)
      warnings.push({
        code: 'no-fall',
        message: 'no clear falling stretch was found anywhere in the log',
      });
  } else {
    if (candidates.length === 0) {
      const d = decimate(
        timeS,
        levelM,
        excluded,
        options.candidates?.blockSamples ?? defaultBlockSamples(n),
      );
      const { minDropM } = candidateScales(
        levelM,
        excluded,
        d.levelM,
        d.blockSamples,
        options.candidates,
        { resolutionM: q, noiseM: sigma },
      );
      throw new InputError(
        `the level never falls by more than ${m3(minDropM)} (the smallest fall that stands clear of the noise) ` +
          'without a hold or a rise: is this a drain test? Check the level column, or choose the window by hand',
        { field: 'level' },
      );
    }
    const best = candidates[0];
    notes.push({
      code: 'drain-chosen',
      message: `the largest fall is used: ${candidateLine(best)}`,
    });
    for (const c of candidates.slice(1))
      notes.push({ code: 'other-drain', message: `another fall, not used: ${candidateLine(c)}` });
    if (candidates.length > 1 && candidates[1].dropM >= 0.8 * best.dropM) {
      warnings.push({
        code: 'similar-drains',
        message:
          'another fall is nearly as large as the one used: check that the right drain was picked',
      });
    }

    // 3. Onset and the valve-opening transient.
    const earliest = candidates
      .filter((c) => c.endIndex <= best.startIndex)
      .reduce((e, c) => Math.max(e, c.endIndex), 0);
    const onset = findOnset(
      timeS,
      levelM,
      excluded,
      best.startIndex,
      best.endIndex,
      earliest,
      sigma,
      q,
      best.dropM,
    );
    notes.push({
      code: 'valve-opened',
      message:
        onset.holdSamples > 0
          ? `the level left its hold at ${m3(onset.holdLevelM)} (scatter ${(onset.holdScatterM * 1000).toPrecision(2)} mm over ${onset.holdSamples} readings) at about ${s1(onset.timeS)}`
          : `the log starts already falling; the drain is taken from ${s1(onset.timeS)}`,
    });
    const open = openingTrim(timeS, levelM, excluded, onset, best.endIndex, {
      minTrimS: options.minOpeningTrimS ?? 5,
      resolutionM: q,
      outletReadingM: options.outletReadingM,
      areaAtReadingM2: options.areaAtReadingM2,
    });
    startIndex = onset.index;
    while (startIndex < best.endIndex && timeS[startIndex] < onset.timeS + open.trimS) startIndex++;
    const usedS = timeS[startIndex] - onset.timeS;
    const share = usedS / Math.max(1e-9, timeS[best.endIndex] - onset.timeS);
    const pct = `${(share * 100).toFixed(0)} %`;
    const refuseAt = options.refuseOpeningTrimFraction ?? 0.5;
    if (share > refuseAt) {
      throw new InputError(
        `${open.reason}: trimming that leaves too little of the drain (the trim would take ${pct} of it, more than ` +
          `${(refuseAt * 100).toFixed(0)} %), so no Cd is given from an automatic window; choose the window by hand (--window START..END) ` +
          'after looking at the log',
        { field: 'window' },
      );
    }
    if (share > (options.warnOpeningTrimFraction ?? 0.2)) {
      warnings.push({
        code: 'opening-trim-large',
        message: `the valve-opening trim takes ${usedS.toFixed(1)} s, ${pct} of the drain: the valve opened slowly or the start is unsettled; check the window`,
      });
    }
    trims.push({
      what: 'valve-opening',
      fromS: onset.timeS,
      toS: timeS[startIndex],
      reason: `${open.reason}; ${usedS.toFixed(1)} s trimmed (${pct} of the drain)`,
    });

    // 4. The end.
    const cut = cutEnd(
      timeS,
      levelM,
      excluded,
      startIndex,
      best.endIndex,
      headFraction,
      options.outletReadingM,
    );
    endIndex = cut.endIndex;
    trims.push(...cut.trims);
    if (options.outletReadingM === undefined) {
      notes.push({
        code: 'outlet-unknown',
        message:
          "the outlet's level is not known, so the end is cut where the level flattens; give the outlet reading to cut by head",
      });
    }
  }

  const keep = new Uint8Array(n);
  const kept = markKept(excluded, startIndex, endIndex, keep);
  if (kept < minSamples) {
    throw new InputError(
      `the window ${s1(timeS[startIndex] ?? 0)} to ${s1(timeS[endIndex] ?? 0)} holds only ${kept} usable readings; at least ${minSamples} are needed`,
      { field: 'window' },
    );
  }
  const inside = spikes.filter((s) => s.index >= startIndex && s.index <= endIndex).length;
  if (inside)
    notes.push({
      code: 'spikes-in-window',
      message: `${countText(inside, 'spike')} inside the window ${inside === 1 ? 'is' : 'are'} left out of the fit`,
    });
  const setAside = [...clipping, ...flatLines].filter(
    (r) => r.endIndex >= startIndex && r.startIndex <= endIndex,
  );
  if (setAside.length) {
    warnings.push({
      code: 'set-aside-in-window',
      message: `${countText(setAside.length, 'stuck or clipped run')} inside the window ${setAside.length === 1 ? 'is' : 'are'} left out of the fit`,
    });
  }
  notes.push({
    code: 'window',
    message: `the fit window runs from ${s1(timeS[startIndex])} to ${s1(timeS[endIndex])} with ${kept} readings`,
  });

  return {
    window: {
      startIndex,
      endIndex,
      startS: timeS[startIndex],
      endS: timeS[endIndex],
      samples: endIndex - startIndex + 1,
    },
    keep,
    candidates,
    spikes,
    flatLines,
    clipping,
    trims,
    notes,
    warnings,
  };
}
