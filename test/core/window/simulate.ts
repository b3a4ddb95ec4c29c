import { seededRandom } from '../../../server/core/random/prng.js';
/**
 * A small drain-test log simulator for the window tests only (invented data). A vertical cylinder
 * drains by Torricelli's law, h(t) = (√h0 − k·t)² above the outlet, then sits at the outlet
 * level. Phases run one after another; readings get Gaussian noise, 1 mm steps and spikes.
 */
import type { LevelSeries } from '../../../server/core/ingest/series.js';

export type Phase =
  | { kind: 'hold'; durationS: number }
  | { kind: 'fill'; durationS: number; toLevelM: number }
  /** Drain for durationS (the valve shuts at its end), with a wobble after opening. */
  | { kind: 'drain'; durationS: number; k: number; wobbleM?: number; wobbleS?: number };

export interface SimOptions {
  startLevelM: number;
  /** Outlet elevation as a level reading (head zero). */
  outletM: number;
  phases: Phase[];
  dtS?: number;
  noiseM?: number;
  stepM?: number;
  seed?: number;
  /** Spikes: [time s, offset m]. */
  spikes?: [number, number][];
}

export interface SimTruth {
  /** Valve opening times, with the head at opening and the drain's k. */
  drains: { openS: number; shutS: number; head0M: number; k: number; wobbleS: number }[];
  spikeIndices: number[];
  trueLevelM: Float64Array;
}

function prng(seed: number): () => number {
  return seededRandom(seed).uniform;
}

export function simulate(o: SimOptions): { series: LevelSeries; truth: SimTruth } {
  const dt = o.dtS ?? 1;
  const total = o.phases.reduce((s, p) => s + p.durationS, 0);
  const n = Math.floor(total / dt) + 1;
  const timeS = new Float64Array(n);
  const level = new Float64Array(n);
  const truth: SimTruth = { drains: [], spikeIndices: [], trueLevelM: new Float64Array(n) };
  let p = 0;
  let phaseStart = 0;
  let phaseLevel = o.startLevelM;
  const endLevel = (ph: Phase, h: number, tau: number): number => {
    if (ph.kind === 'hold') return h;
    if (ph.kind === 'fill') return h + ((ph.toLevelM - h) * tau) / ph.durationS;
    const r = Math.sqrt(Math.max(0, h - o.outletM)) - ph.k * tau;
    return o.outletM + (r > 0 ? r * r : 0);
  };
  for (const ph of o.phases) {
    if (ph.kind === 'drain')
      truth.drains.push({
        openS: phaseStart,
        shutS: phaseStart + ph.durationS,
        head0M: phaseLevel - o.outletM,
        k: ph.k,
        wobbleS: ph.wobbleS ?? 0,
      });
    phaseLevel = endLevel(ph, phaseLevel, ph.durationS);
    phaseStart += ph.durationS;
  }
  phaseStart = 0;
  phaseLevel = o.startLevelM;
  for (let i = 0; i < n; i++) {
    const t = i * dt;
    while (p < o.phases.length - 1 && t >= phaseStart + o.phases[p].durationS) {
      phaseLevel = endLevel(o.phases[p], phaseLevel, o.phases[p].durationS);
      phaseStart += o.phases[p].durationS;
      p++;
    }
    const ph = o.phases[p];
    const tau = t - phaseStart;
    let h = endLevel(ph, phaseLevel, tau);
    if (ph.kind === 'drain' && ph.wobbleM && ph.wobbleS && tau < ph.wobbleS) {
      // A damped surface wave as the jet starts: decays to 5 % by wobbleS.
      h += ph.wobbleM * Math.exp((-3 * tau) / ph.wobbleS) * Math.sin(2 * Math.PI * 0.4 * tau);
    }
    timeS[i] = t;
    truth.trueLevelM[i] = h;
    level[i] = h;
  }
  const rnd = prng(o.seed ?? 1);
  const noise = o.noiseM ?? 0;
  if (noise > 0) {
    for (let i = 0; i < n; i++) {
      const u = 1 - rnd();
      const v = rnd();
      level[i] += noise * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    }
  }
  for (const [t, off] of o.spikes ?? []) {
    const i = Math.round(t / dt);
    level[i] += off;
    truth.spikeIndices.push(i);
  }
  if (o.stepM) for (let i = 0; i < n; i++) level[i] = Math.round(level[i] / o.stepM) * o.stepM;
  const sourceLine = new Int32Array(n);
  for (let i = 0; i < n; i++) sourceLine[i] = i + 2; // one header line
  return {
    series: {
      timeS,
      levelM: level,
      t0EpochMs: null,
      sourceLine,
      metadata: [],
      columns: [],
      notes: [],
      warnings: [],
    },
    truth,
  };
}

/** Time after opening at which the head is `fraction` of the head at opening. */
export function timeAtHeadFraction(d: { head0M: number; k: number }, fraction: number): number {
  return (Math.sqrt(d.head0M) * (1 - Math.sqrt(fraction))) / d.k;
}
