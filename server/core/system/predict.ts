import { InputError } from '../errors.js';
import { integrateSystem } from './integrate.js';
import { propagate } from './matrix.js';
import {
  coverageFactor,
  estimate,
  operatingTheta,
  outletCovariance,
  type Estimate,
  type SystemModel,
} from './model.js';
import { P, PER_VESSEL, type InflowInput } from './network.js';
import { drainTimeS } from '../budget/drain-time.js';

/**
 * Predictions from a fitted system, with intervals by the delta method: the coupled ODE's own
 * forward sensitivities to each outlet's Cd·a give ∂η(t)/∂θ, and for a drain time
 * ∂(t*)/∂θ = −(∂η_i/∂θ)/(dη_i/dt) at the crossing (implicit function theorem).
 */
function thetaFrom(model: SystemModel, startM: Float64Array): Float64Array {
  const th = operatingTheta(model);
  model.network.vessels.forEach((v, i) => {
    if (!(startM[i] >= 0 && startM[i] <= v.shape.heightM))
      throw new InputError(`start level ${startM[i]} m of ${v.id} is outside the vessel`);
    th[i * PER_VESSEL + P.initialReading] = startM[i] - th[i * PER_VESSEL + P.sensorZero];
  });
  return th;
}

/** Surface levels (above each vessel's bottom) after tS from the start levels, with intervals. */
export function levelsAfter(
  model: SystemModel,
  startM: Float64Array,
  inflows: readonly InflowInput[],
  tS: number,
): Estimate[] {
  const n = model.network.vessels.length;
  const th = thetaFrom(model, startM);
  const cov = outletCovariance(model);
  const free = cov ? cov.index : new Int32Array(0);
  const r = free.length;
  const eta = new Float64Array(n);
  const sens = new Float64Array(n * r);
  if (
    !integrateSystem(model.network, th, Float64Array.of(tS), eta, r ? sens : null, {
      inflows,
      free,
    })
  )
    throw new InputError('the prediction left the model domain');
  const v = cov ? propagate(sens, cov.sigma, n, r) : null;
  const k = coverageFactor(model);
  return Array.from(eta, (x, i) => estimate(x, v ? v[i * n + i] : null, k));
}

/**
 * Time for vessel `vessel`'s surface to fall from startM[vessel] to toM (others start at their
 * startM), with an interval. Searched on a grid of GRID points over a horizon that doubles until
 * the level is crossed, then located by cubic interpolation between grid points.
 */
const GRID = 2000;
export function timeToLevel(
  model: SystemModel,
  startM: Float64Array,
  inflows: readonly InflowInput[],
  vessel: number,
  toM: number,
  maxS = 1e7,
): Estimate {
  const n = model.network.vessels.length;
  const th = thetaFrom(model, startM);
  if (!(toM < startM[vessel]))
    throw new InputError('the target level must be below the start level');
  const cov = outletCovariance(model);
  const free = cov ? cov.index : new Int32Array(0);
  const r = free.length;
  const v0 = model.network.vessels[vessel];
  const c = th[vessel * PER_VESSEL + P.effectiveArea];
  if (toM < v0.outletElevationM) {
    throw new InputError(
      `${toM} m is below ${v0.id}'s outlet (centreline at ${v0.outletElevationM} m above its bottom): the level cannot fall below the outlet through it; give a level at or above ${v0.outletElevationM} m`,
    );
  }
  // a vessel that nothing feeds drains on its own: the exact integral, finite down to the outlet's
  // level (the ODE's straight-line zone near zero head only approaches it)
  const fed =
    inflows.some((f) => f.vessel === vessel) ||
    model.network.vessels.some((v) => v.receiver === vessel) ||
    th[vessel * PER_VESSEL + P.leak] !== 0;
  if (!fed && v0.connection === 'free') {
    const spec = model.specs?.[vessel];
    if (spec) {
      const t = drainTimeS(
        {
          shape: spec,
          outletElevationM: v0.outletElevationM,
          gravity: model.network.gravity,
          effectiveAreaM2: c,
          exponent: 0.5,
        },
        startM[vessel],
        toM,
      );
      let variance: number | null = null;
      if (cov) {
        const a = Array.from(cov.index).indexOf(vessel * PER_VESSEL + P.effectiveArea);
        // t ∝ 1/Cd·a: ∂t/∂(Cd·a) = −t/Cd·a
        if (a >= 0) variance = (t / c) ** 2 * cov.sigma[a * cov.index.length + a];
      }
      return estimate(t, variance, coverageFactor(model));
    }
  }
  // first horizon: the vessel alone, at its starting area, with no inflow
  let horizon =
    (2 *
      v0.shape.areaM2(startM[vessel]) *
      Math.sqrt(Math.max(startM[vessel] - v0.outletElevationM, 1e-6))) /
    (c * Math.sqrt(2 * model.network.gravity));
  for (; horizon <= maxS; horizon *= 2) {
    const t = Float64Array.from({ length: GRID + 1 }, (_, s) => (horizon * s) / GRID);
    const eta = new Float64Array((GRID + 1) * n);
    const sens = new Float64Array((GRID + 1) * n * r);
    if (!integrateSystem(model.network, th, t, eta, r ? sens : null, { inflows, free }))
      throw new InputError('the prediction left the model domain');
    for (let s = 1; s <= GRID; s++) {
      const y1 = eta[(s - 1) * n + vessel];
      const y2 = eta[s * n + vessel];
      if (y2 > toM) continue;
      const u = (y1 - toM) / (y1 - y2);
      const tc = t[s - 1] + u * (t[s] - t[s - 1]);
      // refine on the exact solution at the crossing estimate (one secant step is plenty)
      const one = new Float64Array(n);
      const oneS = new Float64Array(n * r);
      integrateSystem(model.network, th, Float64Array.of(tc), one, r ? oneS : null, {
        inflows,
        free,
      });
      const slope = (y2 - y1) / (t[s] - t[s - 1]);
      const tStar = tc - (one[vessel] - toM) / slope;
      let variance: number | null = null;
      if (cov) {
        const g = Float64Array.from({ length: r }, (_, a) => -oneS[vessel * r + a] / slope);
        variance = propagate(g, cov.sigma, 1, r)[0];
      }
      return estimate(tStar, variance, coverageFactor(model));
    }
  }
  const held = inflows.length > 0 || model.network.vessels.some((v) => v.receiver === vessel);
  throw new InputError(
    `${v0.id} does not fall to ${toM} m within ${maxS} s${held ? ' (the inflow into it holds it up)' : ''}`,
  );
}
