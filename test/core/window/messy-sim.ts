/**
 * Field-like drain logs with known truth, for the window and fit tests only (invented data).
 * A vertical cylinder drains through an outlet at the sensor zero (head = reading) by
 * Torricelli's law, dh/dt = −a(t)·√(2 g h)/A, integrated with RK4 on a step of a tenth of the
 * sample interval; a(t) ramps linearly from 0 to Cd·a over the valve's opening time. The noise
 * can grow with head, differ between the hold and the drain, be AR(1) and wander slowly.
 */
import { seededRandom } from '../../../server/core/random/prng.js';
import type { LevelSeries } from '../../../server/core/ingest/series.js';

export const G = 9.80665;

export interface MessyLog {
  diameterM: number;
  /** Effective outlet area Cd·a when fully open, m². */
  effectiveAreaM2: number;
  head0M: number;
  holdS: number;
  drainS: number;
  /** Samples per second. */
  rateHz: number;
  /** Valve opening time (linear ramp of the area), s; 0 for an instant opening. */
  rampS?: number;
  /** White noise σ = noiseM + noisePerHeadM·head (head-dependent noise). */
  noiseM: number;
  noisePerHeadM?: number;
  /** Noise σ in the hold as a multiple of the drain's law (default 1). */
  holdNoiseFactor?: number;
  /** Lag-1 correlation of the noise (AR(1), marginal σ as above). */
  lag1?: number;
  /** Slow wander: a sine of this amplitude (m) and period (s). */
  wanderM?: number;
  wanderPeriodS?: number;
  seed: number;
}

export function areaM2(o: MessyLog): number {
  return (Math.PI * o.diameterM ** 2) / 4;
}

/** The true level (m above the outlet) at each sample time. */
function trueLevels(o: MessyLog, timeS: Float64Array): Float64Array {
  const A = areaM2(o);
  const ramp = o.rampS ?? 0;
  const rate = (t: number, h: number): number => {
    const tau = t - o.holdS;
    if (tau <= 0 || h <= 0) return 0;
    const a = ramp > 0 ? o.effectiveAreaM2 * Math.min(1, tau / ramp) : o.effectiveAreaM2;
    return (-a * Math.sqrt(2 * G * h)) / A;
  };
  const out = new Float64Array(timeS.length);
  const step = 1 / (10 * o.rateHz);
  let h = o.head0M;
  let t = 0;
  for (let i = 0; i < timeS.length; i++) {
    while (t < timeS[i] - 1e-12) {
      const s = Math.min(step, timeS[i] - t);
      const k1 = rate(t, h);
      const k2 = rate(t + s / 2, h + (s / 2) * k1);
      const k3 = rate(t + s / 2, h + (s / 2) * k2);
      const k4 = rate(t + s, h + s * k3);
      h = Math.max(0, h + (s / 6) * (k1 + 2 * k2 + 2 * k3 + k4));
      t += s;
    }
    out[i] = h;
  }
  return out;
}

export function simulateMessy(o: MessyLog): {
  series: LevelSeries;
  trueLevelM: Float64Array;
  openS: number;
} {
  const n = Math.floor((o.holdS + o.drainS) * o.rateHz) + 1;
  const timeS = new Float64Array(n);
  for (let i = 0; i < n; i++) timeS[i] = i / o.rateHz;
  const truth = trueLevels(o, timeS);
  const rnd = seededRandom(o.seed);
  const rho = o.lag1 ?? 0;
  const levelM = new Float64Array(n);
  let e = rnd.normal();
  const phase = 2 * Math.PI * rnd.uniform();
  for (let i = 0; i < n; i++) {
    if (i > 0) e = rho * e + Math.sqrt(1 - rho * rho) * rnd.normal();
    const inHold = timeS[i] <= o.holdS;
    const sigma =
      (o.noiseM + (o.noisePerHeadM ?? 0) * truth[i]) * (inHold ? (o.holdNoiseFactor ?? 1) : 1);
    const wander = o.wanderM
      ? o.wanderM * Math.sin((2 * Math.PI * timeS[i]) / (o.wanderPeriodS ?? 60) + phase)
      : 0;
    levelM[i] = truth[i] + sigma * e + wander;
  }
  const sourceLine = new Int32Array(n);
  for (let i = 0; i < n; i++) sourceLine[i] = i + 2;
  return {
    series: {
      timeS,
      levelM,
      t0EpochMs: null,
      sourceLine,
      metadata: [],
      columns: [],
      notes: [],
      warnings: [],
    },
    trueLevelM: truth,
    openS: o.holdS,
  };
}

/** The log as CSV text: elapsed seconds and level in metres. */
export function messyCsv(series: LevelSeries): string {
  const rows = ['elapsed_s,level_m'];
  for (let i = 0; i < series.timeS.length; i++)
    rows.push(`${series.timeS[i].toFixed(3)},${series.levelM[i].toFixed(5)}`);
  return rows.join('\n') + '\n';
}
