import { knownInflows, P, PER_VESSEL, type InflowInput, type VesselNetwork } from './network.js';
import type { AlignedLog } from './align.js';
import { interpolateLinear } from './interpolate.js';

/**
 * Start values for the joint fit from a mass balance over the logged span, upstream first:
 * the volume that left vessel i is its own drop plus everything that entered it (known inflows
 * and the outflow of the vessels above), and Cd·a is that volume over ∫ sqrt(2g·H_i) dt.
 * Good to a few per cent on a clean test, which is all the solver needs.
 */
export function startValues(
  network: VesselNetwork,
  logs: readonly AlignedLog[],
  inflows: readonly InflowInput[],
  theta: Float64Array,
): void {
  const n = network.vessels.length;
  const g = network.gravity;
  const byVessel = new Map(logs.map((l) => [l.vessel, l]));
  const zs = (i: number) => theta[i * PER_VESSEL + P.sensorZero];
  const surfaceAt = (i: number, t: number): number => {
    const l = byVessel.get(i)!;
    return interpolateLinear(l.timeS, l.levelM, t) + zs(i);
  };
  for (let i = 0; i < n; i++) theta[i * PER_VESSEL + P.initialReading] = byVessel.get(i)!.levelM[0];
  const span = Math.max(...logs.map((l) => l.timeS[l.timeS.length - 1]));
  const knownVolume = new Float64Array(n);
  const q = new Float64Array(n);
  const steps = 200;
  for (let s = 0; s <= steps; s++) {
    knownInflows(inflows, (span * s) / steps, q);
    for (let i = 0; i < n; i++)
      knownVolume[i] += (s === 0 || s === steps ? 0.5 : 1) * q[i] * (span / steps);
  }
  const outVolume = new Float64Array(n);
  const done = new Uint8Array(n);
  for (let pass = 0; pass < n; pass++) {
    for (let i = 0; i < n; i++) {
      if (done[i]) continue;
      const upstream = network.vessels
        .map((v, j) => (v.receiver === i ? j : -1))
        .filter((j) => j >= 0);
      if (upstream.some((j) => !done[j])) continue;
      const v = network.vessels[i];
      const l = byVessel.get(i)!;
      const last = l.timeS.length - 1;
      const drop = v.shape.volumeM3(l.levelM[0] + zs(i)) - v.shape.volumeM3(l.levelM[last] + zs(i));
      outVolume[i] = drop + knownVolume[i] + upstream.reduce((a, j) => a + outVolume[j], 0);
      let integral = 0;
      for (let s = 1; s <= last; s++) {
        const head = (t: number, y: number) => {
          const surface = y + zs(i);
          if (v.connection === 'submerged' && v.receiver >= 0) {
            const r = network.vessels[v.receiver];
            const down = Math.max(
              surfaceAt(v.receiver, t) + r.baseElevationM,
              v.baseElevationM + v.outletElevationM,
            );
            return v.baseElevationM + surface - down;
          }
          return surface - v.outletElevationM;
        };
        const a = Math.sqrt(2 * g * Math.max(head(l.timeS[s - 1], l.levelM[s - 1]), 0));
        const b = Math.sqrt(2 * g * Math.max(head(l.timeS[s], l.levelM[s]), 0));
        integral += 0.5 * (a + b) * (l.timeS[s] - l.timeS[s - 1]);
      }
      const nominal = (Math.PI * v.boreM ** 2) / 4;
      const c = integral > 0 && outVolume[i] > 0 ? outVolume[i] / integral : 0.6 * nominal;
      theta[i * PER_VESSEL + P.effectiveArea] = Math.min(Math.max(c, 0.05 * nominal), 2 * nominal);
      done[i] = 1;
    }
  }
}
