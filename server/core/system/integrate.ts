import { holdAtOutlet, integrateRk4, type OdeProblem } from '../ode/rk4.js';
import { P, PER_VESSEL, type InflowInput, type VesselNetwork } from './network.js';
import { areas, netFlows, netParameterColumn, rateWork } from './rates.js';

/**
 * The coupled levels of connected vessels, with forward sensitivities for a fit:
 *   dη/dt = f(η, θ, t),  dS/dt = (∂f/∂η)·S + ∂f/∂θ,  S = ∂η/∂θ (n × k),
 * integrated by the one integrator (ode/rk4.ts, as for one vessel in drain/ode.ts): RK4 with
 * cubic Hermite output, the same drained-vessel rule. The step is ACCURACY_SCALE over the fastest
 * rate of the outlets
 * on the square-root law (for one Torricelli vessel ∂f/∂η = speed/(2H)), so the grid follows the
 * fastest vessel; an outlet in the regularised zone near zero head (outflow.ts: an emptied vessel,
 * or two levels that have equalised) only relaxes, so for it the step merely stays inside RK4's
 * stability limit (STABILITY_SCALE over the largest absolute row sum of ∂f/∂η, a Gershgorin bound
 * on every rate). A logged inflow is piecewise linear in time, and RK4
 * loses its order across a kink, so no step crosses one of its sample times: steps end on them.
 */
const ACCURACY_SCALE = 0.02;
const STABILITY_SCALE = 1.5;

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
  for (let i = 0; i < n; i++) {
    const v = network.vessels[i];
    const e0 = initialSurface(theta, i);
    const c = theta[i * PER_VESSEL + P.effectiveArea];
    if (!(c >= 0) || !Number.isFinite(e0) || e0 < 0 || e0 > v.shape.heightM) return false;
    if (!Number.isFinite(theta[i * PER_VESSEL + P.leak])) return false;
  }
  if (timeS.length === 0) return true;
  const free = sens ? options.free : new Int32Array(0);
  const problem = new NetworkLevels(network, theta, options.inflows, free, eta, sens);
  const k = free.length;
  const z0 = new Float64Array(problem.dim);
  for (let i = 0; i < n; i++) z0[i] = initialSurface(theta, i);
  for (let c = 0; c < k; c++) {
    const p = free[c];
    const role = p % PER_VESSEL;
    if (role === P.initialReading || role === P.sensorZero)
      z0[n + Math.floor(p / PER_VESSEL) * k + c] = 1;
  }
  return integrateRk4(problem, z0, timeS);
}

/** State z = [η_0..η_{n−1}, S (n × k, row-major)]. */
class NetworkLevels implements OdeProblem {
  readonly dim: number;
  readonly breaks: Float64Array;
  private readonly n: number;
  private readonly k: number;
  private readonly w: ReturnType<typeof rateWork>;
  private readonly etaView: Float64Array;
  private readonly net: Float64Array;
  private readonly dNet: Float64Array;
  private readonly fEta: Float64Array;
  private readonly col: Float64Array;
  private readonly fTheta: Float64Array;
  /** Largest absolute row sum of ∂f/∂η at the last rates call (stability). */
  private fastest = 0;
  /** Fastest square-root-law rate at the last rates call (accuracy). */
  private signal = 0;

  constructor(
    private readonly network: VesselNetwork,
    private readonly theta: Float64Array,
    private readonly inflows: readonly InflowInput[],
    private readonly free: Int32Array,
    private readonly eta: Float64Array,
    private readonly sens: Float64Array | null,
  ) {
    const n = network.vessels.length;
    const k = free.length;
    this.n = n;
    this.k = k;
    this.dim = n * (1 + k);
    this.breaks = inflowBreaks(inflows);
    this.w = rateWork(n);
    this.etaView = new Float64Array(n);
    this.net = new Float64Array(n);
    this.dNet = new Float64Array(n * n);
    this.fEta = new Float64Array(n * n);
    this.col = new Float64Array(n);
    this.fTheta = new Float64Array(n * k);
  }

  rates(t: number, z: Float64Array, dz: Float64Array): void {
    const { n, k, w, network, theta, etaView, net, dNet, fEta, fTheta, col } = this;
    for (let i = 0; i < n; i++) etaView[i] = z[i];
    netFlows(network, theta, this.inflows, t, etaView, net, dNet, w);
    areas(network, etaView, w);
    let fastest = 0;
    let signal = 0;
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
      const rate =
        c *
        (Math.abs(w.dUp[j]) + Math.abs(w.dDown[j])) *
        (1 / w.area[j] + (r >= 0 ? 1 / w.area[r] : 0));
      if (rate > signal) signal = rate;
    }
    this.fastest = fastest;
    this.signal = signal;
    if (k === 0) return;
    for (let c = 0; c < k; c++) {
      netParameterColumn(network, this.free[c], w, col);
      for (let i = 0; i < n; i++) fTheta[i * k + c] = col[i] / w.area[i];
    }
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < k; c++) {
        let s = fTheta[i * k + c];
        for (let j = 0; j < n; j++) s += fEta[i * n + j] * z[n + j * k + c];
        dz[n + i * k + c] = s;
      }
    }
  }

  stepS(): number {
    return Math.min(
      this.signal > 0 ? ACCURACY_SCALE / this.signal : Infinity,
      this.fastest > 0 ? STABILITY_SCALE / this.fastest : Infinity,
    );
  }

  /** Every drained vessel held at its outlet; at rest when all are and no logged inflow is to come. */
  settle(before: Float64Array, z: Float64Array, dz: Float64Array): boolean {
    const { n, k } = this;
    let held = 0;
    for (let i = 0; i < n; i++) {
      if (holdAtOutlet(before, z, dz, i, this.network.vessels[i].outletElevationM, n + i * k, k, 1))
        held++;
    }
    return held === n && this.breaks.length === 0;
  }

  write(index: number, state: Float64Array): void {
    const { n, k } = this;
    for (let i = 0; i < n; i++) this.eta[index * n + i] = state[i];
    const sens = this.sens;
    if (!sens) return;
    const base = index * n * k;
    for (let j = 0; j < n * k; j++) sens[base + j] = state[n + j];
  }
}

/** Sample times of the logged inflows after t = 0, ascending, without repeats. */
function inflowBreaks(list: readonly InflowInput[]): Float64Array {
  const all: number[] = [];
  for (const f of list) if (f.timeS) for (const x of f.timeS) if (x > 0) all.push(x);
  const sorted = Float64Array.from(all).sort();
  let w = 0;
  for (let i = 0; i < sorted.length; i++)
    if (w === 0 || sorted[i] > sorted[w - 1]) sorted[w++] = sorted[i];
  return sorted.subarray(0, w);
}
