import { THETA } from '../drain/parameters.js';
import { predictReadings } from '../drain/predict.js';
import { createSolveWorkspace, type SolveWorkspace } from '../lsq/index.js';
import { fitVariant, type FittedVariant, type VariantInput } from './variant.js';

/**
 * Cd·a fitted separately in bands of head, to see whether the coefficient holds over the drain
 * (it drifts at low head with vortices and Reynolds-number effects). Each band refits Cd·a and its
 * own initial level with the other terms held at the whole-window values. Each band starts from
 * the whole-window fit (its curve read at the band's first sample, not that one noisy reading),
 * which is within the band's scatter of its optimum, and the bands share one set of work buffers.
 */
export interface HeadBand {
  headFromM: number;
  headToM: number;
  samples: number;
  effectiveAreaM2: number;
  /**
   * Standard uncertainty of the band's Cd·a from the band's fit alone (no bore tolerance), m²:
   * s²(JᵀJ)⁻¹ of the band times the whole window's AR(1) variance inflation.
   */
  standardUncertainty: number;
}

/**
 * `varianceInflation`: the whole fit's AR(1) factor (UncertaintyModel.varianceInflation). We use
 * it rather than each band's own ρ because a band has only about a quarter of the readings and
 * refits its own level and Cd·a: its lag-1 estimate comes out low (short-series bias, and the
 * refit takes up part of the slow wander). In simulation (vertical cylinder, AR(1) ρ = 0.85, 60
 * seeds) the bands' spread over their stated u was 1.11–1.47 with their own factor and 0.98–1.13
 * with the whole window's (test/core/fit/head-bands.test.ts checks the latter).
 */
export function headBands(
  input: VariantInput,
  best: FittedVariant,
  varianceInflation: number,
  bands = 4,
  work: SolveWorkspace = createSolveWorkspace(),
): HeadBand[] {
  const { timeS, levelM, setting } = input;
  const m = timeS.length;
  const zs = best.theta[THETA.sensorZero];
  const head = (i: number) => levelM[i] + zs - setting.outletElevationM;
  const hStart = head(0);
  const hEnd = head(m - 1);
  const out: HeadBand[] = [];
  const at = new Float64Array(1);
  const reading = new Float64Array(1);
  let from = 0;
  for (let b = 0; b < bands; b++) {
    const limit = hStart - ((b + 1) * (hStart - hEnd)) / bands;
    const to =
      b === bands - 1 ? m : firstHeadAtOrBelow(levelM, from, zs, setting.outletElevationM, limit);
    const count = to - from;
    if (count >= 20) {
      const t0 = timeS[from];
      const t = shifted(timeS, from, count, t0);
      const y = levelM.subarray(from, to);
      const start = Float64Array.from(best.theta);
      at[0] = t0;
      const ok = predictReadings(setting, best.solution, best.theta, at, reading, null, best.free);
      start[THETA.initialReading] = ok && Number.isFinite(reading[0]) ? reading[0] : y[0];
      const v = fitVariant(
        { setting, timeS: t, levelM: y },
        { inflow: false, datum: false, exponent: false },
        start,
        undefined,
        { work },
      );
      const s2 = v.solve.sumSquares / Math.max(count - v.k, 1);
      const col = v.free.indexOf(THETA.effectiveArea);
      out.push({
        headFromM: head(from),
        headToM: head(to - 1),
        samples: count,
        effectiveAreaM2: v.theta[THETA.effectiveArea],
        standardUncertainty: Math.sqrt(
          Math.max(v.solve.unscaledCovariance[col * v.k + col] * s2 * varianceInflation, 0),
        ),
      });
    }
    from = to;
  }
  return out;
}

/** First index ≥ from whose head y + z_s − z_o is not above `limit` (levelM.length if none). */
function firstHeadAtOrBelow(
  levelM: Float64Array,
  from: number,
  zs: number,
  zo: number,
  limit: number,
): number {
  let i = from;
  while (i < levelM.length && levelM[i] + zs - zo > limit) i++;
  return i;
}

/** timeS[from .. from+count−1] − t0, as a new array. */
function shifted(timeS: Float64Array, from: number, count: number, t0: number): Float64Array {
  const t = new Float64Array(count);
  for (let i = 0; i < count; i++) t[i] = timeS[from + i] - t0;
  return t;
}
