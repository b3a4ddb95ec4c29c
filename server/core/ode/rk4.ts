/**
 * The one integrator for vessel levels, single or connected: classical RK4 on an internal grid
 * whose step the problem chooses (from its own time scale), cubic Hermite output (values and
 * slopes at both ends of a step) at every requested time, and steps that end on the problem's
 * break times (kinks of a logged inflow, where RK4 would lose its order). The state carries the
 * levels and their forward sensitivities, so a fit gets derivatives from the equations.
 *
 * A drained vessel behaves the same everywhere (holdAtOutlet): once its level reaches its outlet
 * with nothing flowing in, the level stays at the outlet and no longer depends on the parameters
 * (integrating sensitivities into the square root's singularity would only produce noise). When
 * the problem reports that nothing moves any more, every later sample takes the held state.
 */

/** Never a step longer than this fraction of the span, so slow phases are still resolved. */
const MAX_STEP_FRACTION = 0.01;
/** Never a step shorter than this fraction of the span (guards the empty-vessel singularity). */
const MIN_STEP_FRACTION = 1e-7;
/** A level this close above its outlet counts as drained, m. */
export const DRAINED_TOLERANCE_M = 1e-9;

export interface OdeProblem {
  /** Length of the state (levels and sensitivities). */
  readonly dim: number;
  /** Times after 0, ascending, that no step may cross (empty for none). */
  readonly breaks: Float64Array;
  /** dz/dt at (t, z) into dz. */
  rates(t: number, z: Float64Array, dz: Float64Array): void;
  /** The step the problem's accuracy asks for at the state whose rates were evaluated last. */
  stepS(z: Float64Array, dz: Float64Array): number;
  /**
   * After each step, at the new state z with its rates dz (the step began at `before`): hold
   * drained vessels at their outlets (holdAtOutlet); true when nothing will move any more, so
   * later samples take this state.
   */
  settle(before: Float64Array, z: Float64Array, dz: Float64Array): boolean;
  /** The state (values at a sample time) for sample `index`. */
  write(index: number, state: Float64Array): void;
}

/**
 * Integrate from z0 at t = 0 and write the state at each time of timeS (ascending; times ≤ 0
 * take z0). False when the state stops being finite.
 */
export function integrateRk4(problem: OdeProblem, z0: Float64Array, timeS: Float64Array): boolean {
  const m = timeS.length;
  if (m === 0) return true;
  const dim = problem.dim;
  const span = Math.max(timeS[m - 1], 1e-9);
  const maxStep = span * MAX_STEP_FRACTION;
  const minStep = span * MIN_STEP_FRACTION;
  const breaks = problem.breaks;
  const z = Float64Array.from(z0);
  const dz = new Float64Array(dim);
  const zNext = new Float64Array(dim);
  const dzNext = new Float64Array(dim);
  const k2 = new Float64Array(dim);
  const k3 = new Float64Array(dim);
  const k4 = new Float64Array(dim);
  const tmp = new Float64Array(dim);
  problem.rates(0, z, dz);
  let i = 0;
  while (i < m && timeS[i] <= 0) problem.write(i++, z);
  let b = 0;
  let t = 0;
  while (i < m) {
    let h = Math.min(Math.max(problem.stepS(z, dz), minStep), maxStep);
    while (b < breaks.length && breaks[b] <= t) b++;
    const toBreak = b < breaks.length && t + h >= breaks[b];
    if (toBreak) h = breaks[b] - t;
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * dz[j];
    problem.rates(t + 0.5 * h, tmp, k2);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * k2[j];
    problem.rates(t + 0.5 * h, tmp, k3);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + h * k3[j];
    problem.rates(t + h, tmp, k4);
    for (let j = 0; j < dim; j++)
      zNext[j] = z[j] + (h / 6) * (dz[j] + 2 * k2[j] + 2 * k3[j] + k4[j]);
    const tNext = toBreak ? breaks[b] : t + h;
    for (let j = 0; j < dim; j++) if (!Number.isFinite(zNext[j])) return false;
    problem.rates(tNext, zNext, dzNext);
    if (problem.settle(z, zNext, dzNext)) {
      i = hermiteOutput(problem, timeS, i, t, h, tNext, z, dz, zNext, dzNext, tmp);
      while (i < m) problem.write(i++, zNext);
      return true;
    }
    i = hermiteOutput(problem, timeS, i, t, h, tNext, z, dz, zNext, dzNext, tmp);
    t = tNext;
    z.set(zNext);
    dz.set(dzNext);
  }
  return true;
}

/**
 * Cubic Hermite states at the samples i, i+1, … inside (t, tNext]; returns the first sample past
 * the step. Runs once per sample, so it is a small function of its own that the JIT optimises early.
 */
function hermiteOutput(
  problem: OdeProblem,
  timeS: Float64Array,
  i: number,
  t: number,
  h: number,
  tNext: number,
  z: Float64Array,
  dz: Float64Array,
  zNext: Float64Array,
  dzNext: Float64Array,
  state: Float64Array,
): number {
  const m = timeS.length;
  const dim = state.length;
  while (i < m && timeS[i] <= tNext) {
    const s = (timeS[i] - t) / h;
    const s2 = s * s;
    const s3 = s2 * s;
    const h00 = 2 * s3 - 3 * s2 + 1;
    const h10 = (s3 - 2 * s2 + s) * h;
    const h01 = -2 * s3 + 3 * s2;
    const h11 = (s3 - s2) * h;
    for (let j = 0; j < dim; j++)
      state[j] = h00 * z[j] + h10 * dz[j] + h01 * zNext[j] + h11 * dzNext[j];
    problem.write(i++, state);
  }
  return i;
}

/**
 * The drained-vessel rule, shared by every problem: a level that was at or above its outlet when
 * the step began and is now at or below it (within DRAINED_TOLERANCE_M), and is not being filled,
 * is set to the outlet (never below the bottom), its rate to 0, and its sensitivities (state
 * entries first, first + stride, … count of them) and their rates to 0. A level that starts
 * below its outlet (an empty receiver) follows its mass balance. True when the vessel is held.
 */
export function holdAtOutlet(
  before: Float64Array,
  z: Float64Array,
  dz: Float64Array,
  level: number,
  outletM: number,
  first: number,
  count: number,
  stride: number,
): boolean {
  if (
    before[level] < outletM - DRAINED_TOLERANCE_M ||
    z[level] > outletM + DRAINED_TOLERANCE_M ||
    dz[level] > 0
  )
    return false;
  z[level] = Math.max(outletM, 0);
  dz[level] = 0;
  for (let c = 0; c < count; c++) {
    z[first + c * stride] = 0;
    dz[first + c * stride] = 0;
  }
  return true;
}
