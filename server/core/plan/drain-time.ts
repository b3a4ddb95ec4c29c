import type { DrainSetting } from '../drain/parameters.js';

/**
 * Free drain through an orifice (n = ½, no inflow): A(η)·dη/dt = −Cd·a·√(2g·(η − z_o)).
 * With s = √(η − z_o) (so dη = 2s·ds) the drain time between two surfaces is
 *   t = 2/(Cd·a·√(2g)) · ∫ A(z_o + s²) ds   over [s1, s0],
 * a smooth integrand with no singularity at the outlet, integrated by composite Simpson.
 * For a constant area it is the closed form 2A/(Cd·a·√(2g))·(√H0 − √H1) exactly.
 */
const PANELS = 2000;

export function drainTimeS(
  setting: DrainSetting,
  effectiveAreaM2: number,
  fromSurfaceM: number,
  toSurfaceM: number,
): number {
  const zo = setting.outletElevationM;
  const s0 = Math.sqrt(Math.max(fromSurfaceM - zo, 0));
  const s1 = Math.sqrt(Math.max(toSurfaceM - zo, 0));
  if (!(s0 > s1)) return 0;
  return (2 / (effectiveAreaM2 * Math.sqrt(2 * setting.gravity))) * areaIntegral(setting, s1, s0);
}

/** ∫ A(z_o + s²) ds from s1 to s0 by composite Simpson. */
function areaIntegral(setting: DrainSetting, s1: number, s0: number): number {
  const { shape, outletElevationM: zo } = setting;
  if (shape.constantArea) return shape.areaM2(zo) * (s0 - s1);
  const h = (s0 - s1) / PANELS;
  let sum = shape.areaM2(zo + s1 * s1) + shape.areaM2(zo + s0 * s0);
  for (let i = 1; i < PANELS; i++) {
    const s = s1 + i * h;
    sum += (i % 2 === 1 ? 4 : 2) * shape.areaM2(zo + s * s);
  }
  return (sum * h) / 3;
}

export interface DrainCurve {
  timeS: number[];
  /** Surface elevation above the vessel's lowest interior point, m. */
  surfaceM: number[];
  outflowM3S: number[];
}

/** The level and outflow against time from the opening down to `toSurfaceM`, at `points` levels evenly spaced in √head. */
export function drainCurve(
  setting: DrainSetting,
  effectiveAreaM2: number,
  fromSurfaceM: number,
  toSurfaceM: number,
  points = 121,
): DrainCurve {
  const zo = setting.outletElevationM;
  const s0 = Math.sqrt(Math.max(fromSurfaceM - zo, 0));
  const s1 = Math.sqrt(Math.max(toSurfaceM - zo, 0));
  const out: DrainCurve = { timeS: [], surfaceM: [], outflowM3S: [] };
  const root2g = Math.sqrt(2 * setting.gravity);
  for (let i = 0; i < points; i++) {
    const s = s0 - ((s0 - s1) * i) / (points - 1);
    const surface = zo + s * s;
    out.timeS.push(drainTimeS(setting, effectiveAreaM2, fromSurfaceM, surface));
    out.surfaceM.push(surface);
    out.outflowM3S.push(effectiveAreaM2 * root2g * s);
  }
  return out;
}

/** Surface elevation after `timeS` of draining from `fromSurfaceM` (bisection on the drain time). */
export function surfaceAfter(
  setting: DrainSetting,
  effectiveAreaM2: number,
  fromSurfaceM: number,
  timeS: number,
): number {
  const zo = setting.outletElevationM;
  if (setting.shape.constantArea) {
    const c = (effectiveAreaM2 * Math.sqrt(2 * setting.gravity)) / setting.shape.areaM2(zo);
    const u = Math.sqrt(Math.max(fromSurfaceM - zo, 0)) - (c * timeS) / 2;
    return u > 0 ? zo + u * u : zo;
  }
  let lo = zo;
  let hi = fromSurfaceM;
  for (let k = 0; k < 60; k++) {
    const mid = 0.5 * (lo + hi);
    if (drainTimeS(setting, effectiveAreaM2, fromSurfaceM, mid) > timeS) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
