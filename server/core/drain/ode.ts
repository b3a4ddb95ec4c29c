import { THETA, type DrainSetting } from './parameters.js';

/**
 * Level-dependent plan area (or an inflow term): integrate the mass balance
 *   A(η)·dη/dt = Q_in − Cd·a·(2g·(η − z_o))^n
 * together with its forward sensitivities s_j = ∂η/∂θ_j, which obey
 *   ds_j/dt = (∂f/∂η)·s_j + ∂f/∂θ_j,
 * so the solver gets derivatives from the equations themselves, not from differencing the
 * solution. Classical RK4 on an internal grid whose step follows the local time scale
 * H/|dη/dt|, then cubic Hermite interpolation (values and slopes at the nodes) to each sample time.
 */

/** Fraction of the local time scale taken per step; 0.005 keeps the level error near 1e-9 m. */
const STEP_FRACTION = 0.005;
/** At most this fraction of the span per step, so slow phases are still resolved. */
const MAX_STEP_FRACTION = 0.01;
/** A step never shrinks below this fraction of the span (guards the empty-vessel singularity). */
const MIN_STEP_FRACTION = 1e-7;


export function odeReadings(
  setting: DrainSetting,
  theta: Float64Array,
  timeS: Float64Array,
  out: Float64Array,
  jac: Float64Array | null,
  free: Int32Array,
): boolean {
  const cdA = theta[THETA.effectiveArea];
  const zs = theta[THETA.sensorZero];
  const qIn = theta[THETA.inflow];
  const n = theta[THETA.exponent];
  const zo = setting.outletElevationM;
  const g2 = 2 * setting.gravity;
  const shape = setting.shape;
  const eta0 = theta[THETA.initialReading] + zs;
  if (!(cdA >= 0) || !(n > 0) || !Number.isFinite(eta0) || !Number.isFinite(qIn)) return false;
  if (eta0 <= zo || eta0 <= 0 || eta0 > shape.heightM) return false;
  const m = timeS.length;
  if (m === 0) return true;

  const k = jac ? free.length : 0;
  const dim = 1 + k;
  // role of each sensitivity column, resolved once
  const role = new Int32Array(k);
  let zeroCol = -1; // y = η − z_s: the datum's column carries an extra −1
  for (let c = 0; c < k; c++) {
    role[c] = free[c];
    if (free[c] === THETA.sensorZero) zeroCol = c;
  }

  /** dz/dt into dz for state z = [η, s_0..s_{k−1}]. */
  const rates = (z: Float64Array, dz: Float64Array): void => {
    const eta = z[0];
    const head = eta - zo;
    // an empty vessel whose plan area vanishes at the bottom (sphere, cone) just stays empty
    const area = Math.max(shape.areaM2(eta), 1e-12);
    let q = 0;
    let dqdH = 0;
    let logTerm = 0;
    if (head > 0) {
      const base = g2 * head;
      q = cdA * Math.pow(base, n);
      dqdH = (n * q) / head;
      logTerm = Math.log(base);
    }
    const f = (qIn - q) / area;
    dz[0] = f;
    if (k === 0) return;
    const delta = 1e-7 * Math.max(1, Math.abs(eta));
    const dArea = (shape.areaM2(eta + delta) - shape.areaM2(eta - delta)) / (2 * delta);
    const fEta = (-dqdH - f * dArea) / area;
    for (let c = 0; c < k; c++) {
      let fTheta = 0;
      switch (role[c]) {
        case THETA.effectiveArea:
          fTheta = head > 0 ? -Math.pow(g2 * head, n) / area : 0;
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
  };

  const span = timeS[m - 1];
  const maxStep = Math.max(span * MAX_STEP_FRACTION, 1e-9);
  const minStep = Math.max(span * MIN_STEP_FRACTION, 1e-12);

  const z = new Float64Array(dim);
  const dz = new Float64Array(dim);
  const zNext = new Float64Array(dim);
  const dzNext = new Float64Array(dim);
  const k2 = new Float64Array(dim);
  const k3 = new Float64Array(dim);
  const k4 = new Float64Array(dim);
  const tmp = new Float64Array(dim);

  z[0] = eta0;
  for (let c = 0; c < k; c++) {
    z[1 + c] = role[c] === THETA.initialReading || role[c] === THETA.sensorZero ? 1 : 0;
  }
  rates(z, dz);

  let t = 0;
  let i = 0;
  // samples at or before t = 0 take the initial state
  while (i < m && timeS[i] <= 0) {
    writeSample(i, z);
    i++;
  }
  while (i < m) {
    const head = Math.max(z[0] - zo, 0);
    const speed = Math.abs(dz[0]);
    const scale = speed > 0 ? Math.max(head, 1e-6) / speed : Infinity;
    let h = Math.min(STEP_FRACTION * scale, maxStep);
    if (h < minStep) h = minStep;
    // RK4 step
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * dz[j];
    rates(tmp, k2);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * k2[j];
    rates(tmp, k3);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + h * k3[j];
    rates(tmp, k4);
    for (let j = 0; j < dim; j++) zNext[j] = z[j] + (h / 6) * (dz[j] + 2 * k2[j] + 2 * k3[j] + k4[j]);
    if (qIn <= 0 && zNext[0] <= zo + 1e-9) {
      // drained to the outlet: the level stays there and no longer depends on the parameters
      // (integrating the sensitivities into the sqrt singularity would only produce noise)
      zNext[0] = Math.max(zo, 0);
      for (let j = 1; j < dim; j++) zNext[j] = 0;
      dzNext.fill(0);
      while (i < m) writeSample(i++, zNext);
      return true;
    }
    rates(zNext, dzNext);
    if (!Number.isFinite(zNext[0])) return false;
    const tNext = t + h;
    // Hermite interpolation for every sample inside (t, tNext], straight to the outputs
    i = hermiteOutput(timeS, i, t, h, tNext, z, dz, zNext, dzNext, out, jac, k, zs, zeroCol);
    t = tNext;
    z.set(zNext);
    dz.set(dzNext);
  }
  return true;

  function writeSample(index: number, state: Float64Array): void {
    out[index] = state[0] - zs;
    if (!jac) return;
    const row = index * k;
    for (let c = 0; c < k; c++) {
      jac[row + c] = state[1 + c] - (role[c] === THETA.sensorZero ? 1 : 0);
    }
  }
}


/**
 * Cubic Hermite values (and sensitivities) at the samples i, i+1, … inside (t, tNext], from the
 * states and slopes at both ends of the step; returns the first sample past the step. This loop
 * runs once per sample (the steps only a few hundred times), so it is a small function of its own
 * that the JIT optimises early, kept flat.
 */
function hermiteOutput(
  timeS: Float64Array,
  i: number,
  t: number,
  h: number,
  tNext: number,
  z: Float64Array,
  dz: Float64Array,
  zNext: Float64Array,
  dzNext: Float64Array,
  out: Float64Array,
  jac: Float64Array | null,
  k: number,
  zs: number,
  zeroCol: number,
): number {
  const m = timeS.length;
  while (i < m && timeS[i] <= tNext) {
    const s = (timeS[i] - t) / h;
    const s2 = s * s;
    const s3 = s2 * s;
    const h00 = 2 * s3 - 3 * s2 + 1;
    const h10 = (s3 - 2 * s2 + s) * h;
    const h01 = -2 * s3 + 3 * s2;
    const h11 = (s3 - s2) * h;
    out[i] = h00 * z[0] + h10 * dz[0] + h01 * zNext[0] + h11 * dzNext[0] - zs;
    if (jac !== null && k > 0) {
      const row = i * k;
      for (let c = 0; c < k; c++) {
        const j = c + 1;
        jac[row + c] = h00 * z[j] + h10 * dz[j] + h01 * zNext[j] + h11 * dzNext[j];
      }
      if (zeroCol >= 0) jac[row + zeroCol] -= 1;
    }
    i++;
  }
  return i;
}
