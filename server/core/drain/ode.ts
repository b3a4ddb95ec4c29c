import { holdAtOutlet, integrateRk4, type OdeProblem } from '../ode/rk4.js';
import { THETA, type DrainSetting } from './parameters.js';

/**
 * Level-dependent plan area (or an inflow term): integrate the mass balance
 *   A(η)·dη/dt = Q_in − Cd·a·(2g·(η − z_o))^n
 * together with its forward sensitivities s_j = ∂η/∂θ_j, which obey
 *   ds_j/dt = (∂f/∂η)·s_j + ∂f/∂θ_j,
 * with the one integrator (ode/rk4.ts) on a grid whose step follows the local time scale
 * H/|dη/dt|. Once drained to the outlet the level and its sensitivities are held (ode/rk4.ts).
 */

/** Fraction of the local time scale taken per step; 0.005 keeps the level error near 1e-9 m. */
const STEP_FRACTION = 0.005;

export function odeReadings(
  setting: DrainSetting,
  theta: Float64Array,
  timeS: Float64Array,
  out: Float64Array,
  jac: Float64Array | null,
  free: Int32Array,
): boolean {
  const cdA = theta[THETA.effectiveArea];
  const n = theta[THETA.exponent];
  const eta0 = theta[THETA.initialReading] + theta[THETA.sensorZero];
  if (!(cdA >= 0) || !(n > 0) || !Number.isFinite(eta0) || !Number.isFinite(theta[THETA.inflow]))
    return false;
  if (eta0 <= setting.outletElevationM || eta0 <= 0 || eta0 > setting.shape.heightM) return false;
  if (timeS.length === 0) return true;
  const problem = new SingleVesselDrain(setting, theta, out, jac, jac ? free : new Int32Array(0));
  const z0 = new Float64Array(problem.dim);
  z0[0] = eta0;
  for (let c = 0; c < problem.k; c++) {
    z0[1 + c] = free[c] === THETA.initialReading || free[c] === THETA.sensorZero ? 1 : 0;
  }
  return integrateRk4(problem, z0, timeS);
}

/** State z = [η, s_0..s_{k−1}], s_c = ∂η/∂θ_free[c]. */
class SingleVesselDrain implements OdeProblem {
  readonly dim: number;
  readonly k: number;
  readonly breaks = new Float64Array(0);
  private readonly cdA: number;
  private readonly zs: number;
  private readonly qIn: number;
  private readonly n: number;
  private readonly zo: number;
  private readonly g2: number;
  /** The column of the sensor zero (y = η − z_s carries an extra −1 there), or −1. */
  private readonly zeroCol: number;

  constructor(
    private readonly setting: DrainSetting,
    theta: Float64Array,
    private readonly out: Float64Array,
    private readonly jac: Float64Array | null,
    private readonly role: Int32Array,
  ) {
    this.k = role.length;
    this.dim = 1 + this.k;
    this.cdA = theta[THETA.effectiveArea];
    this.zs = theta[THETA.sensorZero];
    this.qIn = theta[THETA.inflow];
    this.n = theta[THETA.exponent];
    this.zo = setting.outletElevationM;
    this.g2 = 2 * setting.gravity;
    this.zeroCol = role.indexOf(THETA.sensorZero);
  }

  rates(_t: number, z: Float64Array, dz: Float64Array): void {
    const shape = this.setting.shape;
    const eta = z[0];
    const head = eta - this.zo;
    // an empty vessel whose plan area vanishes at the bottom (sphere, cone) just stays empty
    const area = Math.max(shape.areaM2(eta), 1e-12);
    let q = 0;
    let dqdH = 0;
    let logTerm = 0;
    if (head > 0) {
      const base = this.g2 * head;
      q = this.cdA * Math.pow(base, this.n);
      dqdH = (this.n * q) / head;
      logTerm = Math.log(base);
    }
    const f = (this.qIn - q) / area;
    dz[0] = f;
    const k = this.k;
    if (k === 0) return;
    const delta = 1e-7 * Math.max(1, Math.abs(eta));
    const dArea = (shape.areaM2(eta + delta) - shape.areaM2(eta - delta)) / (2 * delta);
    const fEta = (-dqdH - f * dArea) / area;
    for (let c = 0; c < k; c++) {
      let fTheta = 0;
      switch (this.role[c]) {
        case THETA.effectiveArea:
          fTheta = head > 0 ? -Math.pow(this.g2 * head, this.n) / area : 0;
          break;
        case THETA.inflow:
          fTheta = 1 / area;
          break;
        case THETA.exponent:
          fTheta = head > 0 ? (-q * logTerm) / area : 0;
          break;
        default:
          fTheta = 0;
      }
      dz[1 + c] = fEta * z[1 + c] + fTheta;
    }
  }

  stepS(z: Float64Array, dz: Float64Array): number {
    const speed = Math.abs(dz[0]);
    return speed > 0 ? (STEP_FRACTION * Math.max(z[0] - this.zo, 1e-6)) / speed : Infinity;
  }

  settle(before: Float64Array, z: Float64Array, dz: Float64Array): boolean {
    return holdAtOutlet(before, z, dz, 0, this.zo, 1, this.k, 1);
  }

  write(index: number, state: Float64Array): void {
    this.out[index] = state[0] - this.zs;
    const jac = this.jac;
    if (jac === null) return;
    const k = this.k;
    const row = index * k;
    for (let c = 0; c < k; c++) jac[row + c] = state[1 + c];
    if (this.zeroCol >= 0) jac[row + this.zeroCol] -= 1;
  }
}
