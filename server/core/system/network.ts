import { makeShape, type VesselShape } from '../geometry/index.js';
import { STANDARD_GRAVITY_MS2 } from '../units/index.js';
import type { Connection, SystemSpec } from './schema.js';
import { interpolateLinear } from './interpolate.js';

/**
 * The connected vessels as the equations see them. Vessel i's state is its surface elevation η_i
 * above its own lowest interior point; a submerged link compares surfaces on the site datum
 * (base_i + η_i). Parameters sit in blocks of PER_VESSEL, one block per vessel, in file order.
 */
export interface NetworkVessel {
  id: string;
  shape: VesselShape;
  outletElevationM: number;
  /** Index of the receiving vessel, or −1 when the outlet discharges out of the system. */
  receiver: number;
  connection: Connection;
  baseElevationM: number;
  /** Elevation of the sensor's zero above the lowest interior point, when the vessel file gives it. */
  sensorZeroM: number | null;
  boreM: number;
  boreToleranceM: number;
  /** Cd·a from the system file (effectiveAreaM2, or dischargeCoefficient × bore area), if given. */
  knownEffectiveAreaM2: number | null;
}

export interface VesselNetwork {
  vessels: NetworkVessel[];
  gravity: number;
}

/** Known inflows: a constant, or a piecewise-linear schedule on the model's clock (held outside it). */
export interface InflowInput {
  vessel: number;
  constantM3S?: number;
  timeS?: Float64Array;
  flowM3S?: Float64Array;
}

export const PER_VESSEL = 4;
export const P = {
  /** Cd·a of the vessel's outlet, m². */
  effectiveArea: 0,
  /** Level reading at t = 0 (sensor frame), m. */
  initialReading: 1,
  /** Elevation of the sensor's zero above the vessel's lowest interior point, m. */
  sensorZero: 2,
  /** Unknown constant inflow into the vessel (a passing valve), m³/s. */
  leak: 3,
} as const;
const P_NAMES = [
  'effectiveAreaM2',
  'initialReadingM',
  'sensorZeroElevationM',
  'leakInflowM3S',
] as const;

export function parameterIndex(vessel: number, role: number): number {
  return vessel * PER_VESSEL + role;
}

export function parameterName(network: VesselNetwork, index: number): string {
  return `${network.vessels[Math.floor(index / PER_VESSEL)].id}.${P_NAMES[index % PER_VESSEL]}`;
}

export function buildNetwork(spec: SystemSpec): VesselNetwork {
  const index = new Map(spec.vessels.map((v, i) => [v.id, i]));
  const gravities = new Set(spec.vessels.map((v) => v.gravityMS2 ?? STANDARD_GRAVITY_MS2));
  const vessels = spec.vessels.map((v): NetworkVessel => {
    const nominal = (Math.PI * v.outlet.boreM ** 2) / 4;
    const known =
      v.effectiveAreaM2 ??
      (v.dischargeCoefficient !== undefined ? v.dischargeCoefficient * nominal : null);
    return {
      id: v.id,
      shape: makeShape(v.shape),
      outletElevationM: v.outlet.elevationM,
      receiver: v.dischargesTo === null ? -1 : index.get(v.dischargesTo)!,
      connection: v.connection,
      baseElevationM: v.baseElevationM ?? 0,
      sensorZeroM: v.sensor?.zeroElevationM ?? null,
      boreM: v.outlet.boreM,
      boreToleranceM: v.outlet.boreToleranceM ?? 0,
      knownEffectiveAreaM2: known,
    };
  });
  // one site, one g: take the first vessel's (they agree unless a file is odd)
  return { vessels, gravity: gravities.values().next().value as number };
}

/** Total known inflow into each vessel at time t (m³/s), into out. */
export function knownInflows(inflows: readonly InflowInput[], t: number, out: Float64Array): void {
  out.fill(0);
  for (const f of inflows) out[f.vessel] += inflowAt(f, t);
}

function inflowAt(f: InflowInput, t: number): number {
  return f.constantM3S !== undefined ? f.constantM3S : interpolateLinear(f.timeS!, f.flowM3S!, t);
}
