import type { HeadBand } from '../fit/head-bands.js';
import { invertSymmetric, type Linearisation } from './sensitivity.js';

/**
 * Slow systematic effects inside the data (a sensor's daily temperature swing, a slowly opening
 * valve) leave residuals whose structure at long time scales a lag-1 model cannot see. Two checks
 * of the AR(1)-corrected variance of Cd·a, each against what its own sampling noise allows:
 *
 * 1. Delete-a-block jackknife over B contiguous time blocks of the window (Künsch 1989's blocks,
 *    with the jackknife variance (B−1)/B·Σ(θ_(b) − θ̄)²). Each deleted-block estimate is one
 *    Gauss–Newton step from θ̂: θ_(b) − θ̂ = −(JᵀJ − J_bᵀJ_b)⁻¹·J_bᵀ(f − y)_b (no refits). Under
 *    white or AR(1) noise it estimates the same variance with about B − 1 degrees of freedom, so
 *    it counts as disagreeing only above the χ²(B−1) 99 % point over B − 1.
 * 2. Cd·a by head band (fit/head-bands.ts): the bands' scatter about their weighted mean,
 *    χ²/(bands − 1) (the Birge ratio squared), against the χ²(bands − 1) 99 % point.
 * When one disagrees, the type-A variance is multiplied by the larger significant ratio and its
 * degrees of freedom become that check's (B − 1 or bands − 1), with a warning saying why.
 */
export interface DriftCheck {
  blocks: number;
  /** Jackknife variance of Cd·a over the AR(1)-corrected variance. */
  jackknifeRatio: number | null;
  jackknifeLimit: number | null;
  /** χ²/(ν) of the head bands' Cd·a, and its limit. */
  headBandRatio: number | null;
  headBandLimit: number | null;
  /** Factor applied to the type-A variance (1 when nothing disagrees). */
  varianceFactor: number;
  /** Degrees of freedom of the widened type A (null: the fit's own). */
  degreesOfFreedom: number | null;
  reason: string | null;
}

/**
 * χ²(ν) 99 % points over ν, ν = 1 … 12 (from memory of the usual χ² tables; the test checks them
 * against the F distribution, χ²/ν = F(ν, ∞)). The 99 % and not the 95 % point: blocks differ in
 * leverage (the early, high-head blocks carry more of Cd·a's information), so the jackknife
 * variance has fewer effective degrees of freedom than B − 1, and at the 95 % point white noise
 * tripped the check in 14 of 100 simulated drains (head bands: 10 of 100).
 */
const CHI2_99_OVER_NU = [
  NaN,
  6.635,
  4.605,
  3.782,
  3.319,
  3.017,
  2.802,
  2.639,
  2.511,
  2.407,
  2.321,
  2.248,
  2.185,
];

export const DRIFT_BLOCKS = 10;
const MIN_BLOCK_SAMPLES = 20;

export function driftCheck(
  lin: Linearisation,
  arVariance: number,
  bands: readonly HeadBand[],
): DriftCheck {
  const { m, k, jacobian, residuals, areaColumn } = lin;
  const B = Math.min(DRIFT_BLOCKS, Math.floor(m / MIN_BLOCK_SAMPLES));
  let jackknifeRatio: number | null = null;
  let jackknifeLimit: number | null = null;
  if (B >= 5 && areaColumn >= 0 && arVariance > 0) {
    const full = new Float64Array(k * k);
    for (let i = 0; i < m; i++) addOuter(full, jacobian, i, k, 1);
    const deltas = new Float64Array(B);
    for (let b = 0; b < B; b++) {
      const from = Math.floor((b * m) / B);
      const to = Math.floor(((b + 1) * m) / B);
      const reduced = Float64Array.from(full);
      const g = new Float64Array(k);
      for (let i = from; i < to; i++) {
        addOuter(reduced, jacobian, i, k, -1);
        // J_bᵀ(f − y)_b = −J_bᵀ r_b
        for (let a = 0; a < k; a++) g[a] -= jacobian[i * k + a] * residuals[i];
      }
      const inv = invertSymmetric(reduced, k);
      let d = 0;
      for (let a = 0; a < k; a++) d -= inv[areaColumn * k + a] * g[a];
      deltas[b] = d;
    }
    let mean = 0;
    for (let b = 0; b < B; b++) mean += deltas[b];
    mean /= B;
    let ss = 0;
    for (let b = 0; b < B; b++) ss += (deltas[b] - mean) ** 2;
    jackknifeRatio = (((B - 1) / B) * ss) / arVariance;
    jackknifeLimit = CHI2_99_OVER_NU[B - 1];
  }
  let headBandRatio: number | null = null;
  let headBandLimit: number | null = null;
  const usable = bands.filter(
    (b) => b.standardUncertainty > 0 && Number.isFinite(b.effectiveAreaM2),
  );
  if (usable.length >= 3) {
    let sw = 0;
    let swx = 0;
    for (const b of usable) {
      const w = 1 / b.standardUncertainty ** 2;
      sw += w;
      swx += w * b.effectiveAreaM2;
    }
    const mean = swx / sw;
    let chi2 = 0;
    for (const b of usable) chi2 += ((b.effectiveAreaM2 - mean) / b.standardUncertainty) ** 2;
    headBandRatio = chi2 / (usable.length - 1);
    headBandLimit = CHI2_99_OVER_NU[usable.length - 1];
  }
  const jkOver = jackknifeRatio !== null && jackknifeRatio > jackknifeLimit! ? jackknifeRatio : 0;
  const hbOver = headBandRatio !== null && headBandRatio > headBandLimit! ? headBandRatio : 0;
  let varianceFactor = 1;
  let degreesOfFreedom: number | null = null;
  let reason: string | null = null;
  if (jkOver > 0 || hbOver > 0) {
    if (jkOver >= hbOver) {
      varianceFactor = jkOver;
      degreesOfFreedom = B - 1;
      reason = `Cd·a varies between time blocks of the window more than the AR(1) correction allows (delete-a-block jackknife over ${B} blocks: ${jkOver.toFixed(2)} × the AR(1) variance, limit ${jackknifeLimit!.toFixed(2)}): a slow systematic effect (sensor drift, a daily swing, a changing outlet). The fit's own (type A) uncertainty was widened by √${jkOver.toFixed(2)} = ${Math.sqrt(jkOver).toFixed(2)} with ${B - 1} degrees of freedom.`;
    } else {
      varianceFactor = hbOver;
      degreesOfFreedom = usable.length - 1;
      reason = `Cd·a differs between head bands more than their uncertainties allow (χ²/ν = ${hbOver.toFixed(2)}, limit ${headBandLimit!.toFixed(2)}): the coefficient changes over the drain or a slow systematic effect is present. The fit's own (type A) uncertainty was widened by √${hbOver.toFixed(2)} = ${Math.sqrt(hbOver).toFixed(2)} with ${usable.length - 1} degrees of freedom.`;
    }
  }
  return {
    blocks: B,
    jackknifeRatio,
    jackknifeLimit,
    headBandRatio,
    headBandLimit,
    varianceFactor,
    degreesOfFreedom,
    reason,
  };
}

function addOuter(
  target: Float64Array,
  jacobian: Float64Array,
  i: number,
  k: number,
  sign: number,
): void {
  const row = i * k;
  for (let a = 0; a < k; a++)
    for (let b = 0; b < k; b++) target[a * k + b] += sign * jacobian[row + a] * jacobian[row + b];
}
