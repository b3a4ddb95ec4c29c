// The one integrator (server/core/ode/rk4.ts), through both of its problems: one vessel
// (drain/ode.ts) and connected vessels (system/integrate.ts). Checked against closed forms of
// ordinary calculus, against each other, and against central differences.
import { describe, expect, it } from 'vitest';
import { odeReadings } from '../../../server/core/drain/ode.js';
import { THETA, THETA_SIZE, type DrainSetting } from '../../../server/core/drain/parameters.js';
import { integrateRk4, type OdeProblem } from '../../../server/core/ode/rk4.js';
import { integrateSystem } from '../../../server/core/system/integrate.js';
import { P, PER_VESSEL } from '../../../server/core/system/network.js';
import { rig, THREE_MIXED, truthTheta } from '../system/fixtures.js';

const g = 9.80665; // standard gravity, NIST SP 811 / CGPM 1901

/** dz/dt = −z from z = 1, at a fixed step. */
function decay(stepS: number, times: Float64Array): Float64Array {
  const out = new Float64Array(times.length);
  const p: OdeProblem = {
    dim: 1,
    breaks: new Float64Array(0),
    rates: (_t, z, dz) => {
      dz[0] = -z[0];
    },
    stepS: () => stepS,
    settle: () => false,
    write: (i, z) => {
      out[i] = z[0];
    },
  };
  expect(integrateRk4(p, Float64Array.of(1), times)).toBe(true);
  return out;
}

describe('the RK4 engine with Hermite output', () => {
  it('follows z = e^(−t) (closed form) at step and between-step times, with fourth-order error', () => {
    const times = Float64Array.of(0.123, 0.5, 1, 2.345, 5);
    const coarse = decay(0.05, times);
    const fine = decay(0.025, times);
    let eCoarse = 0,
      eFine = 0;
    times.forEach((t, i) => {
      eCoarse = Math.max(eCoarse, Math.abs(coarse[i] - Math.exp(-t)));
      eFine = Math.max(eFine, Math.abs(fine[i] - Math.exp(-t)));
    });
    expect(eCoarse).toBeLessThan(1e-6);
    // halving the step divides an O(h⁴) error by about 16
    expect(eCoarse / eFine).toBeGreaterThan(10);
    expect(eCoarse / eFine).toBeLessThan(24);
  });

  it('ends steps on break times, so a kinked rate is integrated exactly', () => {
    const ends: number[] = [];
    const withBreaks = (breaks: Float64Array): OdeProblem => ({
      dim: 1,
      breaks,
      // a piecewise-linear rate with a kink at 0.373 (off the 0.01 s grid; as a logged inflow has at its readings)
      rates: (t, _z, dz) => {
        dz[0] = Math.max(0.373 - t, 0);
      },
      stepS: () => 0.3,
      settle: () => false,
      write: (i, z) => {
        ends[i] = z[0];
      },
    });
    // ∫₀^0.373 (0.373 − t) dt = 0.373²/2; RK4 is exact on a polynomial piece
    integrateRk4(
      withBreaks(Float64Array.of(0.373, 0.81)),
      Float64Array.of(0),
      Float64Array.of(0.373, 1),
    );
    expect(ends[0]).toBeCloseTo(0.373 ** 2 / 2, 12);
    expect(ends[1]).toBeCloseTo(0.373 ** 2 / 2, 12);
    // without the break a step crosses the kink and the result is off
    integrateRk4(withBreaks(new Float64Array(0)), Float64Array.of(0), Float64Array.of(1));
    expect(Math.abs(ends[0] - 0.373 ** 2 / 2)).toBeGreaterThan(1e-8);
  });
});

// One invented vertical cylinder (test rig, not real plant): D = 1 m, bore 50 mm, outlet 0.1 m up.
const oneNet = rig([
  { id: 'T', diameterM: 1, heightM: 2.5, boreM: 0.05, outletM: 0.1, zeroM: 0.05, to: null },
]);
const vessel = oneNet.vessels[0];
const areaM2 = Math.PI / 4;
const cd = 0.6;
const cdA = (cd * (Math.PI * 0.05 ** 2)) / 4;
const surface0 = 1.2;
const h0 = surface0 - vessel.outletElevationM;
// Torricelli, constant area: sqrt(H) = sqrt(H0) − Cd·a·sqrt(2g)/(2A)·t; drained at t_d
const drainTimeS = (2 * areaM2 * Math.sqrt(h0)) / (cdA * Math.sqrt(2 * g));
const headAt = (t: number) =>
  Math.max(Math.sqrt(h0) - (cdA * Math.sqrt(2 * g) * t) / (2 * areaM2), 0) ** 2;

function single(times: Float64Array, free: number[]): { level: Float64Array; jac: Float64Array } {
  const setting: DrainSetting = {
    shape: vessel.shape,
    outletElevationM: vessel.outletElevationM,
    gravity: oneNet.gravity,
  };
  const th = new Float64Array(THETA_SIZE);
  th[THETA.effectiveArea] = cdA;
  th[THETA.initialReading] = surface0;
  th[THETA.exponent] = 0.5;
  const level = new Float64Array(times.length);
  const jac = new Float64Array(times.length * free.length);
  expect(odeReadings(setting, th, times, level, jac, Int32Array.from(free))).toBe(true);
  return { level, jac };
}

function network(times: Float64Array, free: number[]): { level: Float64Array; sens: Float64Array } {
  const th = truthTheta(oneNet, [cd], [surface0]);
  const level = new Float64Array(times.length);
  const sens = new Float64Array(times.length * free.length);
  expect(
    integrateSystem(oneNet, th, times, level, sens, { inflows: [], free: Int32Array.from(free) }),
  ).toBe(true);
  return { level, sens };
}

describe('one vessel, as a single drain and as a network of one', () => {
  const times = Float64Array.from({ length: 9 }, (_, i) => (i / 10) * drainTimeS);

  it('both follow the Torricelli closed form while draining', () => {
    const s = single(times, []);
    const nw = network(times, []);
    times.forEach((t, i) => {
      const want = vessel.outletElevationM + headAt(t);
      expect(Math.abs(s.level[i] - want)).toBeLessThan(1e-7);
      // the network's step rule is coarser (system/integrate.ts); still far below logger resolution
      expect(Math.abs(nw.level[i] - want)).toBeLessThan(1e-5);
    });
  });

  it('both give ∂η/∂(Cd·a) of the closed form: −sqrt(H)·sqrt(2g)·t/A', () => {
    const s = single(times, [THETA.effectiveArea]);
    const nw = network(times, [P.effectiveArea]);
    times.forEach((t, i) => {
      const want = (-Math.sqrt(headAt(t)) * Math.sqrt(2 * g) * t) / areaM2;
      expect(Math.abs(s.jac[i] - want)).toBeLessThan(1e-6 * Math.max(1, Math.abs(want)));
      expect(Math.abs(nw.sens[i] - want)).toBeLessThan(1e-3 * Math.max(1, Math.abs(want)));
    });
  });

  it('once drained, both hold the level at the outlet with no sensitivity (one drained-vessel rule)', () => {
    const after = Float64Array.of(
      drainTimeS * 0.5,
      drainTimeS + 60,
      drainTimeS + 300,
      drainTimeS * 3,
    );
    const s = single(after, [THETA.effectiveArea]);
    const nw = network(after, [P.effectiveArea]);
    for (let i = 1; i < after.length; i++) {
      expect(s.level[i]).toBe(vessel.outletElevationM);
      expect(s.jac[i]).toBe(0);
      expect(nw.level[i]).toBe(vessel.outletElevationM);
      expect(nw.sens[i]).toBe(0);
    }
  });
});

describe('coupled vessels', () => {
  it('a free cascade into a closed receiver: the upper vessel drains by Torricelli, the lower gains its volume', () => {
    const net = rig([
      { id: 'U', diameterM: 1, heightM: 2.5, boreM: 0.05, outletM: 0.1, zeroM: 0.05, to: 'L' },
      { id: 'L', diameterM: 1.4, heightM: 2.5, boreM: 0.05, outletM: 0.1, zeroM: 0.05, to: null },
    ]);
    const th = truthTheta(net, [cd, 0], [surface0, 0.3]);
    const times = Float64Array.from({ length: 6 }, (_, i) => (i / 6) * drainTimeS);
    const eta = new Float64Array(times.length * 2);
    expect(
      integrateSystem(net, th, times, eta, null, { inflows: [], free: new Int32Array(0) }),
    ).toBe(true);
    const aLower = (Math.PI * 1.4 ** 2) / 4;
    times.forEach((t, s) => {
      const upper = 0.1 + headAt(t);
      expect(Math.abs(eta[2 * s] - upper)).toBeLessThan(1e-5);
      expect(
        Math.abs(eta[2 * s + 1] - (0.3 + (areaM2 / aLower) * (surface0 - eta[2 * s]))),
      ).toBeLessThan(1e-9);
    });
  });

  it('sensitivities of three mixed vessels agree with central differences of the levels', () => {
    const net = rig(THREE_MIXED);
    const th = truthTheta(net, [0.62, 0.6, 0.61], [1.6, 0.9, 1.1]);
    const free = Int32Array.of(
      P.effectiveArea,
      PER_VESSEL + P.effectiveArea,
      2 * PER_VESSEL + P.initialReading,
    );
    const times = Float64Array.of(30, 120, 400);
    const n = 3,
      k = free.length;
    const eta = new Float64Array(times.length * n);
    const sens = new Float64Array(times.length * n * k);
    expect(integrateSystem(net, th, times, eta, sens, { inflows: [], free })).toBe(true);
    for (let c = 0; c < k; c++) {
      const step = free[c] % PER_VESSEL === P.effectiveArea ? 1e-7 : 1e-5;
      const up = Float64Array.from(th),
        down = Float64Array.from(th);
      up[free[c]] += step;
      down[free[c]] -= step;
      const a = new Float64Array(times.length * n),
        b = new Float64Array(times.length * n);
      integrateSystem(net, up, times, a, null, { inflows: [], free: new Int32Array(0) });
      integrateSystem(net, down, times, b, null, { inflows: [], free: new Int32Array(0) });
      for (let e = 0; e < times.length * n; e++) {
        const fd = (a[e] - b[e]) / (2 * step);
        expect(Math.abs(sens[e * k + c] - fd)).toBeLessThan(
          2e-3 * Math.max(1e-3, Math.abs(fd)) + 1e-6,
        );
      }
    }
  });
});
