import { P, PER_VESSEL, type InflowInput, type VesselNetwork } from './network.js';
import { areas, netFlows, netParameterColumn, rateWork } from './rates.js';

/**
 * The coupled levels of connected vessels, with forward sensitivities for a fit:
 *   dη/dt = f(η, θ, t),  dS/dt = (∂f/∂η)·S + ∂f/∂θ,  S = ∂η/∂θ (n × k),
 * integrated as drain/ode.ts does for one vessel: classical RK4 on an internal grid, cubic Hermite
 * output at each requested time. The step is ACCURACY_SCALE over the fastest rate of the outlets
 * on the square-root law (for one Torricelli vessel ∂f/∂η = speed/(2H)), so the grid follows the
 * fastest vessel; an outlet in the regularised zone near zero head (outflow.ts: an emptied vessel,
 * or two levels that have equalised) only relaxes, so for it the step merely stays inside RK4's
 * stability limit (STABILITY_SCALE over the largest absolute row sum of ∂f/∂η, a Gershgorin bound
 * on every rate). Capped at 1 % of the span. A logged inflow is piecewise linear in time, and RK4
 * loses its order across a kink, so no step crosses one of its sample times: steps end on them.
 */
const ACCURACY_SCALE = 0.02;
const STABILITY_SCALE = 1.5;
const MAX_STEP_FRACTION = 0.01;
const MIN_STEP_FRACTION = 1e-7;

export interface IntegrateOptions {
  /** Known inflows on the model clock. */
  inflows: readonly InflowInput[];
  /** Indices into θ of the parameters whose sensitivities are wanted (empty for none). */
  free: Int32Array;
}

/** Surface elevation at t = 0 from θ (reading plus sensor zero). */
function initialSurface(theta: Float64Array, i: number): number {
  return theta[i * PER_VESSEL + P.initialReading] + theta[i * PER_VESSEL + P.sensorZero];
}

/**
 * η at each time of timeS (ascending, ≥ 0) into eta (m × n); sensitivities into sens
 * (m × n × k, sens[(s·n + i)·k + c] = ∂η_i(t_s)/∂θ_free[c]) when given. False when θ is outside the
 * model's domain (a negative Cd·a, a start level outside a vessel).
 */
export function integrateSystem(
  network: VesselNetwork,
  theta: Float64Array,
  timeS: Float64Array,
  eta: Float64Array,
  sens: Float64Array | null,
  options: IntegrateOptions,
): boolean {
  const n = network.vessels.length;
  const k = sens ? options.free.length : 0;
  const free = options.free;
  const inflows = options.inflows;
  for (let i = 0; i < n; i++) {
    const v = network.vessels[i];
    const e0 = initialSurface(theta, i);
    const c = theta[i * PER_VESSEL + P.effectiveArea];
    if (!(c >= 0) || !Number.isFinite(e0) || e0 < 0 || e0 > v.shape.heightM) return false;
    if (!Number.isFinite(theta[i * PER_VESSEL + P.leak])) return false;
  }
  const m = timeS.length;
  if (m === 0) return true;
  const dim = n * (1 + k);
  const w = rateWork(n);
  const etaView = new Float64Array(n);
  const net = new Float64Array(n);
  const dNet = new Float64Array(n * n);
  const fEta = new Float64Array(n * n);
  const col = new Float64Array(n);
  const fTheta = new Float64Array(n * k);
  let fastest = 0;
  let signal = 0;

  /** dz/dt at (t, z) into dz; also leaves the fastest rate in `fastest`. */
  const rates = (t: number, z: Float64Array, dz: Float64Array): void => {
    for (let i = 0; i < n; i++) etaView[i] = z[i];
    netFlows(network, theta, inflows, t, etaView, net, dNet, w);
    areas(network, etaView, w);
    fastest = 0;
    signal = 0;
    for (let i = 0; i < n; i++) {
      const f = net[i] / w.area[i];
      dz[i] = f;
      let rowSum = 0;
      for (let j = 0; j < n; j++) {
        let d = dNet[i * n + j] / w.area[i];
        if (j === i) d -= f * w.areaSlope[i];
        fEta[i * n + j] = d;
        rowSum += Math.abs(d);
      }
      if (rowSum > fastest) fastest = rowSum;
      const shapeRate = Math.abs(f * w.areaSlope[i]);
      if (shapeRate > signal) signal = shapeRate;
    }
    for (let j = 0; j < n; j++) {
      if (w.regular[j]) continue;
      const r = network.vessels[j].receiver;
      const c = theta[j * PER_VESSEL + P.effectiveArea];
      const rate = c * (Math.abs(w.dUp[j]) + Math.abs(w.dDown[j])) * (1 / w.area[j] + (r >= 0 ? 1 / w.area[r] : 0));
      if (rate > signal) signal = rate;
    }
    if (k === 0) return;
    for (let c = 0; c < k; c++) {
      netParameterColumn(network, free[c], w, col);
      for (let i = 0; i < n; i++) fTheta[i * k + c] = col[i] / w.area[i];
    }
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < k; c++) {
        let s = fTheta[i * k + c];
        for (let j = 0; j < n; j++) s += fEta[i * n + j] * z[n + j * k + c];
        dz[n + i * k + c] = s;
      }
    }
  };

  const span = Math.max(timeS[m - 1], 1e-9);
  const maxStep = span * MAX_STEP_FRACTION;
  const minStep = span * MIN_STEP_FRACTION;
  const z = new Float64Array(dim);
  const dz = new Float64Array(dim);
  const zNext = new Float64Array(dim);
  const dzNext = new Float64Array(dim);
  const k2 = new Float64Array(dim);
  const k3 = new Float64Array(dim);
  const k4 = new Float64Array(dim);
  const tmp = new Float64Array(dim);
  for (let i = 0; i < n; i++) z[i] = initialSurface(theta, i);
  for (let c = 0; c < k; c++) {
    const p = free[c];
    const role = p % PER_VESSEL;
    if (role === P.initialReading || role === P.sensorZero) z[n + Math.floor(p / PER_VESSEL) * k + c] = 1;
  }
  rates(0, z, dz);
  const breaks = inflowBreaks(inflows);
  let b = 0;
  let t = 0;
  let s = 0;
  while (s < m && timeS[s] <= 0) write(s++, z);
  while (s < m) {
    let h = Math.min(signal > 0 ? ACCURACY_SCALE / signal : maxStep, fastest > 0 ? STABILITY_SCALE / fastest : maxStep);
    h = Math.min(Math.max(h, minStep), maxStep);
    while (b < breaks.length && breaks[b] <= t) b++;
    const toBreak = b < breaks.length && t + h >= breaks[b];
    if (toBreak) h = breaks[b] - t;
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * dz[j];
    rates(t + 0.5 * h, tmp, k2);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + 0.5 * h * k2[j];
    rates(t + 0.5 * h, tmp, k3);
    for (let j = 0; j < dim; j++) tmp[j] = z[j] + h * k3[j];
    rates(t + h, tmp, k4);
    for (let j = 0; j < dim; j++) zNext[j] = z[j] + (h / 6) * (dz[j] + 2 * k2[j] + 2 * k3[j] + k4[j]);
    const tNext = toBreak ? breaks[b] : t + h;
    rates(tNext, zNext, dzNext);
    if (!Number.isFinite(zNext[0]) || !Number.isFinite(zNext[n - 1])) return false;
    while (s < m && timeS[s] <= tNext) {
      const u = (timeS[s] - t) / h;
      const u2 = u * u;
      const u3 = u2 * u;
      const h00 = 2 * u3 - 3 * u2 + 1;
      const h10 = u3 - 2 * u2 + u;
      const h01 = -2 * u3 + 3 * u2;
      const h11 = u3 - u2;
      for (let j = 0; j < dim; j++) tmp[j] = h00 * z[j] + h10 * h * dz[j] + h01 * zNext[j] + h11 * h * dzNext[j];
      write(s++, tmp);
    }
    t = tNext;
    z.set(zNext);
    dz.set(dzNext);
  }
  return true;

  /** Sample times of the logged inflows after t = 0, ascending, without repeats. */
  function inflowBreaks(list: readonly InflowInput[]): Float64Array {
    const all: number[] = [];
    for (const f of list) if (f.timeS) for (const x of f.timeS) if (x > 0) all.push(x);
    const sorted = Float64Array.from(all).sort();
    let w = 0;
    for (let i = 0; i < sorted.length; i++) if (w === 0 || sorted[i] > sorted[w - 1]) sorted[w++] = sorted[i];
    return sorted.subarray(0, w);
  }

  function write(index: number, state: Float64Array): void {
    for (let i = 0; i < n; i++) eta[index * n + i] = state[i];
    if (!sens) return;
    const base = index * n * k;
    for (let j = 0; j < n * k; j++) sens[base + j] = state[n + j];
  }
}
