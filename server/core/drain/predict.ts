import { closedFormReadings } from './closed-form.js';
import { odeReadings } from './ode.js';
import { THETA, type DrainSetting } from './parameters.js';

export type DrainSolution = 'closed-form' | 'ode';

/** Which solution applies: closed form for a constant plan area with no inflow term. */
export function solutionFor(setting: DrainSetting, inflowInModel: boolean): DrainSolution {
  return setting.shape.constantArea && !inflowInModel ? 'closed-form' : 'ode';
}

/**
 * Model readings at timeS (seconds from the window's start) and, when jac is given, their
 * derivatives with respect to the free entries of θ (row-major m×free.length).
 * Returns false when θ is outside the model's domain.
 */
export function predictReadings(
  setting: DrainSetting,
  solution: DrainSolution,
  theta: Float64Array,
  timeS: Float64Array,
  out: Float64Array,
  jac: Float64Array | null,
  free: Int32Array,
): boolean {
  if (solution === 'closed-form' && theta[THETA.inflow] === 0) {
    return closedFormReadings(setting, theta, timeS, out, jac, free);
  }
  return odeReadings(setting, theta, timeS, out, jac, free);
}
