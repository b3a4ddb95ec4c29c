import { odeReadings } from './ode.js';
import { THETA, THETA_SIZE, type DrainSetting } from './parameters.js';
import { seededRandom } from '../random/prng.js';

/**
 * A simulated drain test with known truth: hold at the filled level, open the valve (a short
 * damped slosh), drain through the real vessel shape, optionally shut and hold again. Used by the
 * tests and to make the invented demo data; never by a fit.
 */
export interface DrainSimulation {
  setting: DrainSetting;
  effectiveAreaM2: number;
  /** Surface elevation above the vessel bottom when the valve opens, m. */
  initialSurfaceM: number;
  sensorZeroElevationM: number;
  inflowM3S?: number;
  exponent?: number;
  sampleIntervalS: number;
  holdBeforeS?: number;
  drainS: number;
  holdAfterS?: number;
  /** Standard deviation of the reading noise, m. */
  noiseM?: number;
  /** Lag-1 autocorrelation of the noise (AR(1)); 0 is white. */
  noiseLag1?: number;
  /** Reading resolution, m (e.g. 0.001 for 1 mm); 0 for none. */
  quantumM?: number;
  /** Peak slosh amplitude at the valve opening, m, decaying over about 10 s. */
  sloshM?: number;
  /** Number of single-sample spikes to add (outside the first 5 samples). */
  spikes?: number;
  seed?: number;
}

export interface SimulatedLog {
  timeS: Float64Array;
  levelM: Float64Array;
  /** Time at which the valve opens, s from the log's start. */
  valveOpenS: number;
  /** Indices of samples with an added spike. */
  spikeIndices: number[];
}

export function simulateDrainTest(sim: DrainSimulation): SimulatedLog {
  const holdBefore = sim.holdBeforeS ?? 0;
  const holdAfter = sim.holdAfterS ?? 0;
  const total = holdBefore + sim.drainS + holdAfter;
  const count = Math.floor(total / sim.sampleIntervalS + 1e-9) + 1;
  const timeS = new Float64Array(count);
  for (let i = 0; i < count; i++) timeS[i] = i * sim.sampleIntervalS;

  const theta = new Float64Array(THETA_SIZE);
  theta[THETA.effectiveArea] = sim.effectiveAreaM2;
  theta[THETA.sensorZero] = sim.sensorZeroElevationM;
  theta[THETA.initialReading] = sim.initialSurfaceM - sim.sensorZeroElevationM;
  theta[THETA.inflow] = sim.inflowM3S ?? 0;
  theta[THETA.exponent] = sim.exponent ?? 0.5;

  // the drain itself, on the drain's own clock
  const drainStart = timeS.findIndex((t) => t >= holdBefore);
  const drainEnd = (() => {
    let j = count - 1;
    while (j > drainStart && timeS[j] > holdBefore + sim.drainS) j--;
    return j;
  })();
  const drainTimes = new Float64Array(drainEnd - drainStart + 1);
  for (let j = 0; j < drainTimes.length; j++) drainTimes[j] = timeS[drainStart + j] - holdBefore;
  const drained = new Float64Array(drainTimes.length);
  if (!odeReadings(sim.setting, theta, drainTimes, drained, null, new Int32Array(0))) {
    throw new RangeError('simulation parameters outside the model domain');
  }

  const clean = new Float64Array(count);
  const startReading = theta[THETA.initialReading];
  const endReading = drained[drained.length - 1];
  for (let i = 0; i < count; i++) {
    if (i < drainStart) clean[i] = startReading;
    else if (i <= drainEnd) clean[i] = drained[i - drainStart];
    else clean[i] = endReading;
  }

  const rng = seededRandom(sim.seed ?? 1);
  const sd = sim.noiseM ?? 0;
  const rho = sim.noiseLag1 ?? 0;
  const innovation = sd * Math.sqrt(1 - rho * rho);
  const slosh = sim.sloshM ?? 0;
  const quantum = sim.quantumM ?? 0;
  const levelM = new Float64Array(count);
  let e = sd * rng.normal();
  for (let i = 0; i < count; i++) {
    if (i > 0) e = rho * e + innovation * rng.normal();
    let v = clean[i] + e;
    const since = timeS[i] - holdBefore;
    if (slosh > 0 && since >= 0 && since < 30)
      v += slosh * Math.exp(-since / 4) * Math.sin((2 * Math.PI * since) / 3);
    if (quantum > 0) v = Math.round(v / quantum) * quantum;
    levelM[i] = v;
  }
  const spikeIndices: number[] = [];
  const spikeCount = sim.spikes ?? 0;
  for (let s = 0; s < spikeCount && count > 10; s++) {
    const idx = 5 + Math.floor(rng.uniform() * (count - 10));
    const size = (0.05 + 0.1 * rng.uniform()) * (rng.uniform() < 0.5 ? -1 : 1);
    levelM[idx] += size;
    spikeIndices.push(idx);
  }
  spikeIndices.sort((a, b) => a - b);
  return { timeS, levelM, valveOpenS: holdBefore, spikeIndices };
}
