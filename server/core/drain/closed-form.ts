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
  // Jacobian columns of each parameter (−1 when fixed), resolved once so the loop has no switch.
  let cArea = -1;
  let cReading = -1;
  let cZero = -1;
  let cExp = -1;
  for (let col = 0; col < k; col++) {
    const j = free[col];
    if (j === THETA.effectiveArea) cArea = col;
    else if (j === THETA.initialReading) cReading = col;
    else if (j === THETA.sensorZero) cZero = col;
    else if (j === THETA.exponent) cExp = col;
  }
  // ∂y/∂(Cd·a) = −u^(m−1)·t·c/(Cd·a); at Cd·a = 0 the same limit through c/(Cd·a) = (2g)^n/A
  const areaFactor = cdA > 0 ? c / cdA : Math.pow(g2, n) / area;
  const mLen = timeS.length;

  // a column of a free parameter the closed form does not have (inflow) is 0
  const other =
    jac !== null &&
    k > (cArea >= 0 ? 1 : 0) + (cReading >= 0 ? 1 : 0) + (cZero >= 0 ? 1 : 0) + (cExp >= 0 ? 1 : 0);
  if (isHalf && !other) {
    // n = ½ (the orifice): u = sqrt(H0) − c·t/2, H = u², u^(m−1) = u; one pass, no pow
    const halfC = 0.5 * c;
    if (!jac) {
      for (let i = 0; i < mLen; i++) {
        const u = sqrtH0 - halfC * timeS[i];
        out[i] = u > 0 ? u * u + offset : offset;
      }
      return true;
    }
    for (let i = 0; i < mLen; i++) {
      const t = timeS[i];
      let u = sqrtH0 - halfC * t;
      if (!(u > 0)) u = 0;
      out[i] = u * u + offset;
      const row = i * k;
      if (cArea >= 0) jac[row + cArea] = -u * t * areaFactor;
      if (cReading >= 0) jac[row + cReading] = u * h0NegN;
      if (cZero >= 0) jac[row + cZero] = u > 0 ? u * h0NegN - 1 : -1;
      if (cExp >= 0) {
        const du = -h0Pow * logH0 + c * t - oneMinusN * t * c * logG2;
        jac[row + cExp] = u > 0 ? u * u * (m * m * Math.log(u) + (m * du) / u) : 0;
      }
    }
    return true;
  }

  for (let i = 0; i < mLen; i++) {
    const t = timeS[i];
    const u = h0Pow - oneMinusN * c * t;
    let head = 0;
    let uPowMm1 = 0; // u^(m−1)
    if (u > 0) {
      head = Math.pow(u, m);
      uPowMm1 = head / u;
    }
    out[i] = head + offset;
    if (!jac) continue;
    const row = i * k;
    if (other) for (let col = 0; col < k; col++) jac[row + col] = 0;
    if (cArea >= 0) jac[row + cArea] = -uPowMm1 * t * areaFactor;
    if (cReading >= 0) jac[row + cReading] = uPowMm1 * h0NegN;
    // H0 = y0 − z_o + z_s, and y = H − z_s + z_o
    if (cZero >= 0) jac[row + cZero] = head > 0 ? uPowMm1 * h0NegN - 1 : -1;
    if (cExp >= 0) {
      const du = -h0Pow * logH0 + c * t - oneMinusN * t * c * logG2;
      jac[row + cExp] = head > 0 ? head * (m * m * Math.log(u) + (m * du) / u) : 0;
    }
  }
  return true;
}

/**
 * ∂y/∂Q_in at Q_in = 0 for a constant plan area and n = ½, the forward sensitivity the ODE would
 * integrate, in closed form. With u = sqrt(H) = u0 − c·t/2 the sensitivity s obeys
 * ds/dt = −(c/(2u))·s + 1/A, s(0) = 0; the integrating factor 1/u gives
 *   s(t) = (2u/(A·c))·ln(u0/u),
 * which starts as t/A (the inflow simply fills the vessel) and is 0 once drained (u = 0).
 * Used by the model comparison's score test for the inflow term, so a constant-area fit needs no
 * ODE. Returns false outside the closed form's domain, for n ≠ ½, or for Cd·a = 0.
 */
export function closedFormInflowSensitivity(
  setting: DrainSetting,
  theta: Float64Array,
  timeS: Float64Array,
  out: Float64Array,
  stride = 1,
  offset = 0,
): boolean {
  const area = setting.shape.areaM2(0);
  const cdA = theta[THETA.effectiveArea];
  const zs = theta[THETA.sensorZero];
  const h0 = theta[THETA.initialReading] - (setting.outletElevationM - zs);
  if (
    !(h0 > 0) ||
    !(cdA > 0) ||
    theta[THETA.exponent] !== 0.5 ||
    !(area > 0) ||
    theta[THETA.inflow] !== 0
  )
    return false;
  const c = (cdA * Math.sqrt(2 * setting.gravity)) / area;
  const u0 = Math.sqrt(h0);
  const factor = 2 / (area * c);
  const halfC = 0.5 * c;
  for (let i = 0; i < timeS.length; i++) {
    const u = u0 - halfC * timeS[i];
    out[i * stride + offset] = u > 0 ? factor * u * Math.log(u0 / u) : 0;
  }
  return true;
}
