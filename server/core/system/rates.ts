import { knownInflows, P, PER_VESSEL, type InflowInput, type VesselNetwork } from './network.js';
import { outletFlow, type OutletFlow } from './outflow.js';

/**
 * The mass balance of every vessel and its partial derivatives:
 *   A_i(η_i)·dη_i/dt = net_i = Q_in,i + q_leak,i + Σ_{j→i} Q_j − Q_i,
 * with Q_j = (Cd·a)_j · q_j(η) from outflow.ts. Allocation-free once the workspace exists.
 */
export interface RateWork {
  n: number;
  inflow: Float64Array;
  /** Q_j/(Cd·a)_j and its slopes against the upstream and downstream surfaces. */
  perArea: Float64Array;
  dUp: Float64Array;
  dDown: Float64Array;
  area: Float64Array;
  /** Relative change of area with level, A'(η)/A(η). */
  areaSlope: Float64Array;
  /** 1 where the outlet is on the straight-line law near zero head (outflow.ts), else 0. */
  regular: Uint8Array;
  flow: OutletFlow;
}

export function rateWork(n: number): RateWork {
  return {
    n,
    inflow: new Float64Array(n),
    perArea: new Float64Array(n),
    dUp: new Float64Array(n),
    dDown: new Float64Array(n),
    area: new Float64Array(n),
    areaSlope: new Float64Array(n),
    regular: new Uint8Array(n),
    flow: { perArea: 0, dUp: 0, dDown: 0, regular: false },
  };
}

/** net flows (m³/s) into `net`; when dNet (n×n, row-major) is given, ∂net_i/∂η_k too. */
export function netFlows(
  network: VesselNetwork,
  theta: Float64Array,
  inflows: readonly InflowInput[],
  t: number,
  eta: Float64Array,
  net: Float64Array,
  dNet: Float64Array | null,
  w: RateWork,
): void {
  const n = w.n;
  knownInflows(inflows, t, w.inflow);
  for (let i = 0; i < n; i++) {
    outletFlow(network, i, eta, w.flow);
    w.perArea[i] = w.flow.perArea;
    w.dUp[i] = w.flow.dUp;
    w.dDown[i] = w.flow.dDown;
    w.regular[i] = w.flow.regular ? 1 : 0;
  }
  for (let i = 0; i < n; i++) net[i] = w.inflow[i] + theta[i * PER_VESSEL + P.leak];
  if (dNet) dNet.fill(0);
  for (let j = 0; j < n; j++) {
    const c = theta[j * PER_VESSEL + P.effectiveArea];
    const q = c * w.perArea[j];
    const r = network.vessels[j].receiver;
    net[j] -= q;
    if (dNet) {
      dNet[j * n + j] -= c * w.dUp[j];
      if (r >= 0) dNet[j * n + r] -= c * w.dDown[j];
    }
    if (r >= 0) {
      net[r] += q;
      if (dNet) {
        dNet[r * n + j] += c * w.dUp[j];
        dNet[r * n + r] += c * w.dDown[j];
      }
    }
  }
}

/** Plan areas and A'/A at the current levels (A' by central difference: shapes give A only). */
export function areas(network: VesselNetwork, eta: Float64Array, w: RateWork): void {
  for (let i = 0; i < w.n; i++) {
    const shape = network.vessels[i].shape;
    const y = eta[i];
    const a = Math.max(shape.areaM2(y), 1e-12);
    const d = 1e-7 * Math.max(1, Math.abs(y));
    w.area[i] = a;
    w.areaSlope[i] = (shape.areaM2(y + d) - shape.areaM2(y - d)) / (2 * d) / a;
  }
}

/**
 * ∂net_i/∂θ_p for one parameter p (the vessel block and role from PER_VESSEL), into col.
 * Needs netFlows to have been called at the same state (uses w.perArea).
 */
export function netParameterColumn(
  network: VesselNetwork,
  p: number,
  w: RateWork,
  col: Float64Array,
): void {
  col.fill(0);
  const j = Math.floor(p / PER_VESSEL);
  const role = p % PER_VESSEL;
  if (role === P.effectiveArea) {
    col[j] -= w.perArea[j];
    const r = network.vessels[j].receiver;
    if (r >= 0) col[r] += w.perArea[j];
  } else if (role === P.leak) {
    col[j] = 1;
  }
}
