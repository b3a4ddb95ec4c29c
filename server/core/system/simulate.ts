import { seededRandom } from '../random/prng.js';
import { integrateSystem } from './integrate.js';
import type { InflowInput, VesselNetwork } from './network.js';

/**
 * A simulated test of connected vessels with known truth: every vessel's logger samples the
 * coupled solution on its own clock (its own interval and offset), with AR(1) noise and optional
 * quantisation. For the tests and the invented demo data; never used by a fit.
 */
export interface SystemSimulation {
  network: VesselNetwork;
  /** θ in the layout of network.ts (PER_VESSEL per vessel). */
  theta: Float64Array;
  inflows?: InflowInput[];
  durationS: number;
  /** Per vessel: sample interval and the offset of its first sample, s. */
  sampleIntervalS: number[];
  sampleOffsetS?: number[];
  noiseM: number;
  noiseLag1?: number;
  quantumM?: number;
  seed: number;
}

export interface SimulatedVesselLog {
  vessel: number;
  timeS: Float64Array;
  levelM: Float64Array;
}

export function simulateSystemTest(sim: SystemSimulation): SimulatedVesselLog[] {
  const n = sim.network.vessels.length;
  const rng = seededRandom(sim.seed);
  const out: SimulatedVesselLog[] = [];
  for (let i = 0; i < n; i++) {
    const dt = sim.sampleIntervalS[i];
    const off = sim.sampleOffsetS?.[i] ?? 0;
    const count = Math.floor((sim.durationS - off) / dt + 1e-9) + 1;
    const timeS = new Float64Array(count);
    for (let s = 0; s < count; s++) timeS[s] = off + s * dt;
    const eta = new Float64Array(count * n);
    if (
      !integrateSystem(sim.network, sim.theta, timeS, eta, null, {
        inflows: sim.inflows ?? [],
        free: new Int32Array(0),
      })
    ) {
      throw new RangeError('simulation parameters outside the model domain');
    }
    const zs = sim.theta[i * 4 + 2];
    const rho = sim.noiseLag1 ?? 0;
    const innovation = sim.noiseM * Math.sqrt(1 - rho * rho);
    const q = sim.quantumM ?? 0;
    const levelM = new Float64Array(count);
    let e = sim.noiseM * rng.normal();
    for (let s = 0; s < count; s++) {
      if (s > 0) e = rho * e + innovation * rng.normal();
      let v = eta[s * n + i] - zs + e;
      if (q > 0) v = Math.round(v / q) * q;
      levelM[s] = v;
    }
    out.push({ vessel: i, timeS, levelM });
  }
  return out;
}
