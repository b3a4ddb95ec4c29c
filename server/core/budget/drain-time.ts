import { InputError } from '../errors.js';
import { makeShape } from '../geometry/index.js';
import type { ShapeSpec } from '../geometry/spec.js';
import { tQuantile } from '../stats/index.js';
import { withFieldChanged } from './inputs.js';

/**
 * One vessel draining through its outlet with no inflow: the time between two levels and the
 * level after a time, from the mass balance A(η)·dη/dt = −Cd·a·(2g)^n·(η − z_o)^n. With the head
 * H = η − z_o written as H = s^p, p = 1/(1 − n), the drain time is
 *   t = p/(Cd·a·(2g)^n) · ∫_{s1}^{s0} A(z_o + s^p) ds,
 * whose integrand is smooth (no singularity at the outlet), so the drain to the outlet's own
 * level is finite; for a constant area it is the closed form 2A(√H0 − √H1)/(Cd·a·√(2g)).
 * Integrated by composite 5-point Gauss–Legendre (Abramowitz & Stegun 25.4.29 nodes and weights).
 * Intervals: each budget input moves the prediction through the fitted Cd·a (c·u) and, for the
 * vessel's own dimensions and the outlet's elevation, directly; the two are added before squaring,
 * so an area error that the fitted Cd·a carries largely cancels in a drain time of the same vessel.
 */
export interface DrainVessel {
  shape: ShapeSpec;
  outletElevationM: number;
  gravity: number;
  effectiveAreaM2: number;
  exponent: number;
}

const GL_X = [0, -0.5384693101056831, 0.5384693101056831, -0.906179845938664, 0.906179845938664];
const GL_W = [
  0.5688888888888889, 0.47862867049936647, 0.47862867049936647, 0.23692688505618908,
  0.23692688505618908,
];
const PANELS = 400;

function checkLevels(v: DrainVessel, levels: number[], height: number): void {
  for (const x of levels) {
    if (!(x >= v.outletElevationM - 1e-12)) {
      throw new InputError(
        `${x} m is below the outlet (centreline at ${v.outletElevationM} m above the vessel's lowest point): the level cannot fall below the outlet through it; give a level at or above ${v.outletElevationM} m`,
      );
    }
    if (Number.isFinite(height) && x > height + 1e-9)
      throw new InputError(`${x} m is above the top of the vessel (${height} m)`);
  }
}

/** Seconds to fall from fromM to toM (levels above the lowest interior point). */
export function drainTimeS(v: DrainVessel, fromM: number, toM: number): number {
  const shape = makeShape(v.shape);
  checkLevels(v, [fromM, toM], shape.heightM);
  if (!(toM <= fromM))
    throw new InputError(
      `the level to drain to (${toM} m) must not be above the start (${fromM} m)`,
    );
  const n = v.exponent;
  const p = 1 / (1 - n);
  const s0 = Math.pow(Math.max(fromM - v.outletElevationM, 0), 1 - n);
  const s1 = Math.pow(Math.max(toM - v.outletElevationM, 0), 1 - n);
  const h = (s0 - s1) / PANELS;
  let sum = 0;
  for (let j = 0; j < PANELS; j++) {
    const mid = s1 + (j + 0.5) * h;
    for (let q = 0; q < 5; q++)
      sum += GL_W[q] * shape.areaM2(v.outletElevationM + Math.pow(mid + (GL_X[q] * h) / 2, p));
  }
  return ((p / (v.effectiveAreaM2 * Math.pow(2 * v.gravity, n))) * sum * h) / 2;
}

/** The level after tS from fromM (the outlet's level once drained to it). */
export function levelAfterS(v: DrainVessel, fromM: number, tS: number): number {
  const full = drainTimeS(v, fromM, v.outletElevationM);
  if (tS >= full) return v.outletElevationM;
  let lo = v.outletElevationM;
  let hi = fromM;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, fromM); i++) {
    const mid = (lo + hi) / 2;
    if (drainTimeS(v, fromM, mid) > tS) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** A budget line as the fit JSON states it (only what a prediction needs). */
export interface BudgetLineForPrediction {
  key: string;
  standardUncertainty: number;
  sensitivityEffectiveArea: number;
  degreesOfFreedom: number | null;
  counted: boolean;
}

export interface PredictionWithBudget {
  value: number;
  standardUncertainty: number;
  effectiveDegreesOfFreedom: number;
  coverageFactor: number;
  ci95: [number, number];
  /** Each input's contribution to the prediction's u. */
  contributions: { key: string; contribution: number }[];
}

/** Propagate the budget through a prediction g(vessel): direct effect of each vessel field plus the effect through Cd·a. */
function withBudget(
  v: DrainVessel,
  lines: readonly BudgetLineForPrediction[],
  g: (x: DrainVessel) => number,
): PredictionWithBudget {
  const value = g(v);
  const hA = v.effectiveAreaM2 * 1e-6;
  const dCdA =
    (g({ ...v, effectiveAreaM2: v.effectiveAreaM2 + hA }) -
      g({ ...v, effectiveAreaM2: v.effectiveAreaM2 - hA })) /
    (2 * hA);
  let sum2 = 0;
  let ws = 0;
  const contributions: { key: string; contribution: number }[] = [];
  for (const l of lines) {
    if (!l.counted || l.key === 'outlet.boreM' || !(l.standardUncertainty > 0)) continue;
    let direct = 0;
    if (l.key.startsWith('shape.') || l.key === 'outlet.elevationM') {
      const h = l.standardUncertainty * 1e-3;
      const moved = (d: number): DrainVessel =>
        l.key === 'outlet.elevationM'
          ? { ...v, outletElevationM: v.outletElevationM + d }
          : { ...v, shape: withFieldChanged({ shape: v.shape }, l.key, d).shape };
      direct = (g(moved(h)) - g(moved(-h))) / (2 * h);
    }
    const u = Math.abs(direct + dCdA * l.sensitivityEffectiveArea) * l.standardUncertainty;
    sum2 += u * u;
    if (l.degreesOfFreedom !== null && Number.isFinite(l.degreesOfFreedom))
      ws += u ** 4 / l.degreesOfFreedom;
    contributions.push({ key: l.key, contribution: u });
  }
  const uc = Math.sqrt(sum2);
  const nu = ws > 0 ? Math.min(uc ** 4 / ws, 1e7) : 1e7;
  const k = tQuantile(0.975, nu);
  return {
    value,
    standardUncertainty: uc,
    effectiveDegreesOfFreedom: nu,
    coverageFactor: k,
    ci95: [value - k * uc, value + k * uc],
    contributions,
  };
}

export function drainTimeWithBudget(
  v: DrainVessel,
  lines: readonly BudgetLineForPrediction[],
  fromM: number,
  toM: number,
): PredictionWithBudget {
  return withBudget(v, lines, (x) => drainTimeS(x, fromM, toM));
}

export function levelAfterWithBudget(
  v: DrainVessel,
  lines: readonly BudgetLineForPrediction[],
  fromM: number,
  tS: number,
): PredictionWithBudget {
  return withBudget(v, lines, (x) => levelAfterS(x, fromM, tS));
}

/** The drain model of a single-vessel fit JSON (what `efflux fit --json` prints), or null when it is not one. */
export function drainVesselFromFit(
  fit: unknown,
): { vessel: DrainVessel; lines: BudgetLineForPrediction[]; name: string; id: string } | null {
  const f = fit as Record<string, any>;
  if (
    !f ||
    typeof f !== 'object' ||
    typeof f.engineVersion !== 'string' ||
    !f.effectiveAreaM2 ||
    !f.vessel?.shape ||
    !f.outlet
  )
    return null;
  const exponent =
    (f.parameters as any[] | undefined)?.find((p) => p.name === 'headExponent')?.value ?? 0.5;
  const vessel: DrainVessel = {
    shape: f.vessel.shape,
    outletElevationM: f.outlet.elevationM,
    gravity: f.vessel.gravityMS2 ?? 9.80665,
    effectiveAreaM2: f.effectiveAreaM2.value,
    exponent,
  };
  const lines: BudgetLineForPrediction[] = Array.isArray(f.budget?.lines)
    ? f.budget.lines
    : // a fit made before the budget: its Cd·a uncertainty alone
      [
        {
          key: 'fit',
          standardUncertainty: f.effectiveAreaM2.standardUncertainty,
          sensitivityEffectiveArea: 1,
          degreesOfFreedom: f.effectiveAreaM2.effectiveDegreesOfFreedom ?? null,
          counted: true,
        },
      ];
  return { vessel, lines, name: f.vessel.name ?? 'vessel', id: f.outlet.id ?? 'vessel' };
}
