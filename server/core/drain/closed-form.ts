import { THETA, type DrainSetting } from './parameters.js';

/**
 * Constant plan area A and no inflow: A·dH/dt = −Cd·a·(2g)^n·H^n has the closed form
 *   H(t) = [H0^(1−n) − (1−n)·c·t]^(1/(1−n)),  c = Cd·a·(2g)^n / A,
 * which for n = ½ is sqrt(H) = sqrt(H0) − c·t/2. Once the bracket reaches zero the vessel has
 * drained to the outlet and H stays 0. Exact partial derivatives follow by calculus.
 * Valid for n < 1 (n = 1 is the exponential limit; the fitter bounds n below it).
 *
 * Fills readings y_i = H_i + z_o − z_s and, when jac is given, J[i*k + c] = ∂y_i/∂θ_free[c].
 * Returns false when θ is outside the model's domain (H0 ≤ 0).
 */
export function closedFormReadings(
  setting: DrainSetting,
  theta: Float64Array,
  timeS: Float64Array,
  out: Float64Array,
  jac: Float64Array | null,
  free: Int32Array,
): boolean {
  const area = setting.shape.areaM2(0);
  const cdA = theta[THETA.effectiveArea];
  const zs = theta[THETA.sensorZero];
  const n = theta[THETA.exponent];
  const offset = setting.outletElevationM - zs; // y = H + offset
  const h0 = theta[THETA.initialReading] - offset;
  if (!(h0 > 0) || !(cdA >= 0) || !(n < 1) || !(area > 0)) return false;

  const g2 = 2 * setting.gravity;
  const c = (cdA * Math.pow(g2, n)) / area;
  const oneMinusN = 1 - n;
  const m = 1 / oneMinusN;
  const h0Pow = Math.pow(h0, oneMinusN);
  const h0NegN = Math.pow(h0, -n);
  const logH0 = Math.log(h0);
  const logG2 = Math.log(g2);
  const isHalf = n === 0.5;
  const sqrtH0 = Math.sqrt(h0);
  const k = free.length;

  for (let i = 0; i < timeS.length; i++) {
    const t = timeS[i];
    const u = isHalf ? sqrtH0 - 0.5 * c * t : h0Pow - oneMinusN * c * t;
    let head: number;
    let uPowMm1: number; // u^(m−1)
    if (u > 0) {
      if (isHalf) {
        head = u * u;
        uPowMm1 = u;
      } else {
        head = Math.pow(u, m);
        uPowMm1 = head / u;
      }
    } else {
      head = 0;
      uPowMm1 = 0;
    }
    out[i] = head + offset;
    if (!jac) continue;
    const row = i * k;
    for (let col = 0; col < k; col++) {
      let d: number;
      switch (free[col]) {
        case THETA.effectiveArea:
          d = cdA > 0 ? (-uPowMm1 * t * c) / cdA : -uPowMm1 * t * (Math.pow(g2, n) / area);
          break;
        case THETA.initialReading:
          d = uPowMm1 * h0NegN;
          break;
        case THETA.sensorZero:
          // H0 = y0 − z_o + z_s, and y = H − z_s + z_o
          d = head > 0 ? uPowMm1 * h0NegN - 1 : -1;
          break;
        case THETA.exponent: {
          if (head > 0) {
            const du = -h0Pow * logH0 + c * t - oneMinusN * t * c * logG2;
            d = head * (m * m * Math.log(u) + (m * du) / u);
          } else d = 0;
          break;
        }
        default:
          d = 0; // inflow is not part of the closed form; the caller uses the ODE when it is free
      }
      jac[row + col] = d;
    }
  }
  return true;
}
