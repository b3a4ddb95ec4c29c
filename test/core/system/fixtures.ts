import { validateSystem, type SystemSpec } from '../../../server/core/system/schema.js';
import {
  buildNetwork,
  P,
  PER_VESSEL,
  type VesselNetwork,
} from '../../../server/core/system/network.js';

/** Invented test rigs (not real plant): vertical cylinders in a chain. */
export interface RigVessel {
  id: string;
  diameterM: number;
  heightM: number;
  boreM: number;
  outletM: number;
  zeroM: number;
  to: string | null;
  connection?: 'free' | 'submerged';
  baseM?: number;
}

export function rigSpec(vessels: RigVessel[]): SystemSpec {
  return validateSystem({
    name: 'test rig (invented)',
    vessels: vessels.map((v) => ({
      id: v.id,
      name: `Vessel ${v.id}`,
      shape: { kind: 'vertical-cylinder', diameterM: v.diameterM, heightM: v.heightM },
      outlet: { boreM: v.boreM, boreToleranceM: 0.0001, elevationM: v.outletM },
      sensor: { zeroElevationM: v.zeroM },
      dischargesTo: v.to,
      connection: v.connection ?? 'free',
      ...(v.baseM !== undefined ? { baseElevationM: v.baseM } : {}),
    })),
  });
}

export function rig(vessels: RigVessel[]): VesselNetwork {
  return buildNetwork(rigSpec(vessels));
}

/** θ from per-vessel (Cd, initial surface) with the rig's sensor zeros. */
export function truthTheta(
  net: VesselNetwork,
  cd: number[],
  surface: number[],
  leak: number[] = [],
): Float64Array {
  const th = new Float64Array(net.vessels.length * PER_VESSEL);
  net.vessels.forEach((v, i) => {
    th[i * PER_VESSEL + P.effectiveArea] = (cd[i] * (Math.PI * v.boreM ** 2)) / 4;
    th[i * PER_VESSEL + P.sensorZero] = v.sensorZeroM ?? 0;
    th[i * PER_VESSEL + P.initialReading] = surface[i] - (v.sensorZeroM ?? 0);
    th[i * PER_VESSEL + P.leak] = leak[i] ?? 0;
  });
  return th;
}

export const TWO_FREE: RigVessel[] = [
  { id: 'T1', diameterM: 1.2, heightM: 2.5, boreM: 0.05, outletM: 0.1, zeroM: 0.05, to: 'T2' },
  { id: 'T2', diameterM: 1.0, heightM: 2.5, boreM: 0.045, outletM: 0.08, zeroM: 0.04, to: null },
];

export const THREE_MIXED: RigVessel[] = [
  {
    id: 'A',
    diameterM: 1.0,
    heightM: 2.5,
    boreM: 0.04,
    outletM: 0.1,
    zeroM: 0.05,
    to: 'B',
    connection: 'submerged',
    baseM: 1.0,
  },
  {
    id: 'B',
    diameterM: 1.1,
    heightM: 2.5,
    boreM: 0.05,
    outletM: 0.1,
    zeroM: 0.05,
    to: 'C',
    baseM: 1.0,
  },
  { id: 'C', diameterM: 1.3, heightM: 3.0, boreM: 0.05, outletM: 0.08, zeroM: 0.04, to: null },
];
