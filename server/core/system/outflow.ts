import type { VesselNetwork } from './network.js';

/**
 * Flow through one outlet, per unit Cd·a, and its slopes against the two surfaces.
 *   free:       Q = Cd·a·sqrt(2g·H),        H = η_i − z_o (the receiver does not act back)
 *   submerged:  Q = sign(Δ)·Cd·a·sqrt(2g·|Δ|), Δ = max(S_i, Z_o) − max(S_r, Z_o) on the site datum,
 * so the flow reverses when the receiver stands higher, and stops when both surfaces are below
 * the outlet. Below a head of REGULAR_HEAD_M the square root is replaced by the straight line
 * through the origin that meets it there: sqrt has an infinite slope at zero head, which would
 * make the sensitivities (and Newton's method) blow up where two levels equalise or a vessel
 * empties. 0.1 mm is far below any logger's resolution, so the law is unchanged where it is seen.
 */
const REGULAR_HEAD_M = 1e-4;

export interface OutletFlow {
  /** Q/(Cd·a), m/s. */
  perArea: number;
  /** ∂(Q/(Cd·a))/∂η_i and ∂(Q/(Cd·a))/∂η_receiver, 1/s. */
  dUp: number;
  dDown: number;
  /** True on the straight-line law (|head| below REGULAR_HEAD_M, or no flow at all). */
  regular: boolean;
}

/** sqrt(2g·|Δ|)·sign(Δ), regularised near zero, and its slope. */
function headLaw(delta: number, g: number, out: { value: number; slope: number }): void {
  const a = Math.abs(delta);
  if (a >= REGULAR_HEAD_M) {
    const v = Math.sqrt(2 * g * a);
    out.value = delta > 0 ? v : -v;
    out.slope = v / (2 * a);
  } else {
    const k = Math.sqrt(2 * g * REGULAR_HEAD_M) / REGULAR_HEAD_M;
    out.value = k * delta;
    out.slope = k;
  }
}

const law = { value: 0, slope: 0 };

export function outletFlow(
  network: VesselNetwork,
  i: number,
  eta: Float64Array,
  out: OutletFlow,
): void {
  const v = network.vessels[i];
  const g = network.gravity;
  if (v.connection === 'free' || v.receiver < 0) {
    const head = eta[i] - v.outletElevationM;
    if (head <= 0) {
      out.perArea = 0;
      out.dUp = 0;
      out.dDown = 0;
      out.regular = true;
      return;
    }
    out.regular = head < REGULAR_HEAD_M;
    headLaw(head, g, law);
    out.perArea = law.value;
    out.dUp = law.slope;
    out.dDown = 0;
    return;
  }
  const r = network.vessels[v.receiver];
  const zo = v.baseElevationM + v.outletElevationM;
  const up = v.baseElevationM + eta[i];
  const down = r.baseElevationM + eta[v.receiver];
  const upWet = up > zo;
  const downWet = down > zo;
  const delta = (upWet ? up : zo) - (downWet ? down : zo);
  out.regular = Math.abs(delta) < REGULAR_HEAD_M;
  headLaw(delta, g, law);
  out.perArea = law.value;
  out.dUp = upWet ? law.slope : 0;
  out.dDown = downWet ? -law.slope : 0;
}
