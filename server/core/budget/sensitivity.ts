import { makeShape } from '../geometry/index.js';
import type { ShapeSpec } from '../geometry/spec.js';
import { THETA, type DrainSetting } from '../drain/parameters.js';
import { predictReadings, type DrainSolution } from '../drain/predict.js';
import { withFieldChanged, type BudgetInput } from './inputs.js';

/**
 * Sensitivity coefficients of the fitted parameters to each input, by differentiating the fitted
 * model: at the optimum the normal equations Jᵀ(y − f) = 0 hold; an input x that moves the
 * readings or the model moves the optimum by dθ/dx = (JᵀJ)⁻¹·Jᵀ·∂(y − f)/∂x (implicit function
 * theorem, dropping the residual-weighted second derivatives, which vanish with the residuals).
 * ∂(y − f)/∂x is a central difference of the model and the corrected readings at θ̂ (no refit);
 * the tests check the result against hand-derived coefficients (closed form) and against central
 * differences of whole refits (ODE shapes).
 */
export interface FittedModel {
  setting: DrainSetting;
  /** The vessel file's shape and outlet, for inputs that change them. */
  shapeSpec: ShapeSpec;
  outletElevationM: number;
  solution: DrainSolution;
  theta: Float64Array;
  free: Int32Array;
  timeS: Float64Array;
  levelM: Float64Array;
}

export interface Linearisation {
  m: number;
  k: number;
  /** ∂f/∂θ_free at θ̂, row-major m×k. */
  jacobian: Float64Array;
  /** y − f(θ̂). */
  residuals: Float64Array;
  /** (JᵀJ)⁻¹, k×k. */
  inverseNormal: Float64Array;
  /** Column of Cd·a among the free parameters. */
  areaColumn: number;
}

export function linearise(model: FittedModel): Linearisation {
  const m = model.timeS.length;
  const k = model.free.length;
  const jacobian = new Float64Array(m * k);
  const f = new Float64Array(m);
  if (
    !predictReadings(
      model.setting,
      model.solution,
      model.theta,
      model.timeS,
      f,
      jacobian,
      model.free,
    )
  )
    throw new RangeError('fitted θ outside the model domain');
  const residuals = new Float64Array(m);
  for (let i = 0; i < m; i++) residuals[i] = model.levelM[i] - f[i];
  const normal = new Float64Array(k * k);
  for (let i = 0; i < m; i++) {
    const row = i * k;
    for (let a = 0; a < k; a++)
      for (let b = a; b < k; b++) normal[a * k + b] += jacobian[row + a] * jacobian[row + b];
  }
  for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) normal[a * k + b] = normal[b * k + a];
  return {
    m,
    k,
    jacobian,
    residuals,
    inverseNormal: invertSymmetric(normal, k),
    areaColumn: Array.from(model.free).indexOf(THETA.effectiveArea),
  };
}

/** Gauss–Jordan inverse with partial pivoting of a small k×k matrix (k ≤ 5 here). */
export function invertSymmetric(a: Float64Array, k: number): Float64Array {
  const w = Float64Array.from(a);
  const inv = new Float64Array(k * k);
  for (let i = 0; i < k; i++) inv[i * k + i] = 1;
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(w[r * k + c]) > Math.abs(w[p * k + c])) p = r;
    if (p !== c) {
      for (let j = 0; j < k; j++) {
        [w[c * k + j], w[p * k + j]] = [w[p * k + j], w[c * k + j]];
        [inv[c * k + j], inv[p * k + j]] = [inv[p * k + j], inv[c * k + j]];
      }
    }
    const d = w[c * k + c];
    for (let j = 0; j < k; j++) {
      w[c * k + j] /= d;
      inv[c * k + j] /= d;
    }
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = w[r * k + c];
      if (f === 0) continue;
      for (let j = 0; j < k; j++) {
        w[r * k + j] -= f * w[c * k + j];
        inv[r * k + j] -= f * inv[c * k + j];
      }
    }
  }
  return inv;
}

/** y − f at θ̂ with the input moved by delta (its own unit). */
function residualsWith(
  model: FittedModel,
  input: BudgetInput,
  delta: number,
  out: Float64Array,
): void {
  const { timeS, levelM } = model;
  const m = timeS.length;
  let setting = model.setting;
  let theta = model.theta;
  let times = timeS;
  let scale = 1;
  let offset = 0;
  const e = input.effect;
  const chain = input.chain ?? 1;
  switch (e.kind) {
    case 'vessel-field': {
      if (e.path.startsWith('shape.')) {
        const spec = withFieldChanged({ shape: model.shapeSpec }, e.path, delta).shape;
        setting = { ...setting, shape: makeShape(spec) };
      } else if (e.path === 'outlet.elevationM')
        setting = { ...setting, outletElevationM: setting.outletElevationM + delta };
      else throw new RangeError(`no model effect for ${e.path}`);
      break;
    }
    case 'sensor-zero':
      theta = Float64Array.from(theta);
      theta[THETA.sensorZero] += delta;
      break;
    case 'reading-offset':
      offset = e.perUnit * chain * delta;
      break;
    case 'reading-scale':
      scale = 1 / (1 + e.perUnit * chain * delta);
      break;
    case 'clock-rate': {
      times = new Float64Array(m);
      for (let i = 0; i < m; i++) times[i] = timeS[i] * (1 + delta);
      break;
    }
    default:
      throw new RangeError(`${e.kind} has no model derivative`);
  }
  if (!predictReadings(setting, model.solution, theta, times, out, null, model.free))
    throw new RangeError(`the model left its domain when ${input.key} moved by ${delta}`);
  for (let i = 0; i < m; i++) out[i] = levelM[i] * scale + offset - out[i];
}

/** dθ_free/dx for one input (length k), by the linear response of the least-squares optimum. */
export function parameterSensitivity(
  model: FittedModel,
  lin: Linearisation,
  input: BudgetInput,
): Float64Array {
  const { m, k, jacobian, inverseNormal } = lin;
  const plus = new Float64Array(m);
  const minus = new Float64Array(m);
  const h = input.step;
  // a stage–area point at height 0 cannot move down: a forward difference there
  const forward = input.effect.kind === 'vessel-field' && input.unit === 'm' && input.value - h < 0;
  residualsWith(model, input, h, plus);
  residualsWith(model, input, forward ? 0 : -h, minus);
  const span = forward ? h : 2 * h;
  const g = new Float64Array(k);
  for (let i = 0; i < m; i++) {
    const d = (plus[i] - minus[i]) / span;
    const row = i * k;
    for (let a = 0; a < k; a++) g[a] += jacobian[row + a] * d;
  }
  const out = new Float64Array(k);
  for (let a = 0; a < k; a++) {
    let s = 0;
    for (let b = 0; b < k; b++) s += inverseNormal[a * k + b] * g[b];
    out[a] = s;
  }
  return out;
}
