/**
 * The Levenberg–Marquardt parameter, after MINPACK's lmpar and qrsolv (Moré 1978).
 *
 * Given the pivoted QR of J (J·P = Q·R), the scaling D and Qᵀr, find par ≥ 0 and the step x
 * solving (JᵀJ + par·DᵀD)·x = Jᵀr in the least-squares sense, such that either par = 0 and
 * ‖D·x‖ ≤ 1.1·Δ, or par > 0 and |‖D·x‖ − Δ| ≤ 0.1·Δ. The caller takes −x as the step.
 *
 * R is n×n column-major (R[j*n + i] = row i, column j); its strict lower triangle is used as
 * scratch and its upper triangle and diagonal are left as they were.
 */
import { euclideanNorm } from './norm.js';

const DWARF = 2.2250738585072014e-308;

export interface LmparWork {
  /** Length n each. */
  wa1: Float64Array;
  wa2: Float64Array;
  sdiag: Float64Array;
  wa4: Float64Array;
}

/**
 * Returns the new par; x receives the (un-negated) step, sdiag the diagonal of the
 * triangular factor S of (Pᵀ(JᵀJ + par·D²)P) = SᵀS.
 */
export function lmParameter(
  n: number,
  R: Float64Array,
  ipvt: Int32Array,
  diag: Float64Array,
  qtb: Float64Array,
  delta: number,
  parIn: number,
  x: Float64Array,
  w: LmparWork,
): number {
  const { wa1, wa2, sdiag } = w;
  // Gauss–Newton direction; a singular R gives a least-squares solution with the trailing part zero.
  let nsing = n;
  for (let j = 0; j < n; j++) {
    wa1[j] = qtb[j];
    if (R[j * n + j] === 0 && nsing === n) nsing = j;
    if (nsing < n) wa1[j] = 0;
  }
  for (let j = nsing - 1; j >= 0; j--) {
    wa1[j] /= R[j * n + j];
    const t = wa1[j];
    for (let i = 0; i < j; i++) wa1[i] -= R[j * n + i] * t;
  }
  for (let j = 0; j < n; j++) x[ipvt[j]] = wa1[j];

  for (let j = 0; j < n; j++) wa2[j] = diag[j] * x[j];
  let dxnorm = euclideanNorm(wa2, 0, n);
  let fp = dxnorm - delta;
  if (fp <= 0.1 * delta) return 0;

  // Lower bound parl from the Newton step (only when R is of full rank).
  let parl = 0;
  if (nsing >= n) {
    for (let j = 0; j < n; j++) {
      const l = ipvt[j];
      wa1[j] = diag[l] * (wa2[l] / dxnorm);
    }
    for (let j = 0; j < n; j++) {
      let sum = 0;
      for (let i = 0; i < j; i++) sum += R[j * n + i] * wa1[i];
      wa1[j] = (wa1[j] - sum) / R[j * n + j];
    }
    const t = euclideanNorm(wa1, 0, n);
    parl = fp / delta / t / t;
  }
  // Upper bound paru from the scaled gradient.
  for (let j = 0; j < n; j++) {
    let sum = 0;
    for (let i = 0; i <= j; i++) sum += R[j * n + i] * qtb[i];
    wa1[j] = sum / diag[ipvt[j]];
  }
  const gnorm = euclideanNorm(wa1, 0, n);
  let paru = gnorm / delta;
  if (paru === 0) paru = DWARF / Math.min(delta, 0.1);

  let par = Math.max(parIn, parl);
  par = Math.min(par, paru);
  if (par === 0) par = gnorm / dxnorm;

  for (let iter = 1; ; iter++) {
    if (par === 0) par = Math.max(DWARF, 0.001 * paru);
    const sp = Math.sqrt(par);
    for (let j = 0; j < n; j++) wa1[j] = sp * diag[j];
    dampedSolve(n, R, ipvt, wa1, qtb, x, sdiag, w.wa4);
    for (let j = 0; j < n; j++) wa2[j] = diag[j] * x[j];
    dxnorm = euclideanNorm(wa2, 0, n);
    const fpOld = fp;
    fp = dxnorm - delta;
    // Accept when within 10 % of Δ, or when parl = 0 and the step can only shrink further.
    if (Math.abs(fp) <= 0.1 * delta || (parl === 0 && fp <= fpOld && fpOld < 0) || iter === 10)
      break;
    // Newton correction to par.
    for (let j = 0; j < n; j++) {
      const l = ipvt[j];
      wa1[j] = diag[l] * (wa2[l] / dxnorm);
    }
    for (let j = 0; j < n; j++) {
      wa1[j] /= sdiag[j];
      const t = wa1[j];
      for (let i = j + 1; i < n; i++) wa1[i] -= R[j * n + i] * t;
    }
    const t = euclideanNorm(wa1, 0, n);
    const parc = fp / delta / t / t;
    if (fp > 0) parl = Math.max(parl, par);
    if (fp < 0) paru = Math.min(paru, par);
    par = Math.max(parl, par + parc);
  }
  return par;
}

/**
 * Solve min ‖[R; D̃]·z − [qtb; 0]‖ with D̃ = Pᵀ·diag·P by Givens rotations (MINPACK qrsolv);
 * x = P·z. `diag` here is already the scaled sqrt(par)·D.
 */
function dampedSolve(
  n: number,
  R: Float64Array,
  ipvt: Int32Array,
  diag: Float64Array,
  qtb: Float64Array,
  x: Float64Array,
  sdiag: Float64Array,
  wa: Float64Array,
): void {
  for (let j = 0; j < n; j++) {
    for (let i = j; i < n; i++) R[j * n + i] = R[i * n + j];
    x[j] = R[j * n + j];
    wa[j] = qtb[j];
  }
  for (let j = 0; j < n; j++) {
    const l = ipvt[j];
    if (diag[l] !== 0) {
      for (let k = j; k < n; k++) sdiag[k] = 0;
      sdiag[j] = diag[l];
      let qtbpj = 0;
      for (let k = j; k < n; k++) {
        if (sdiag[k] === 0) continue;
        const rkk = R[k * n + k];
        let c: number;
        let s: number;
        if (Math.abs(rkk) < Math.abs(sdiag[k])) {
          const cot = rkk / sdiag[k];
          s = 0.5 / Math.sqrt(0.25 + 0.25 * cot * cot);
          c = s * cot;
        } else {
          const tan = sdiag[k] / rkk;
          c = 0.5 / Math.sqrt(0.25 + 0.25 * tan * tan);
          s = c * tan;
        }
        R[k * n + k] = c * rkk + s * sdiag[k];
        const t = c * wa[k] + s * qtbpj;
        qtbpj = -s * wa[k] + c * qtbpj;
        wa[k] = t;
        for (let i = k + 1; i < n; i++) {
          const rik = R[k * n + i];
          const u = c * rik + s * sdiag[i];
          sdiag[i] = -s * rik + c * sdiag[i];
          R[k * n + i] = u;
        }
      }
    }
    sdiag[j] = R[j * n + j];
    R[j * n + j] = x[j];
  }
  let nsing = n;
  for (let j = 0; j < n; j++) {
    if (sdiag[j] === 0 && nsing === n) nsing = j;
    if (nsing < n) wa[j] = 0;
  }
  for (let j = nsing - 1; j >= 0; j--) {
    let sum = 0;
    for (let i = j + 1; i < nsing; i++) sum += R[j * n + i] * wa[i];
    wa[j] = (wa[j] - sum) / sdiag[j];
  }
  for (let j = 0; j < n; j++) x[ipvt[j]] = wa[j];
}
