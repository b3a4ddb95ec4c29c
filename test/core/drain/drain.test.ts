import { describe, expect, it } from 'vitest';
import { closedFormReadings } from '../../../server/core/drain/closed-form.js';
import { odeReadings } from '../../../server/core/drain/ode.js';
import { THETA, THETA_SIZE, type DrainSetting } from '../../../server/core/drain/parameters.js';
import { cone, cylinder, horizontalCylinder, sphere } from './shapes-for-tests.js';

const g = 9.80665;
const sqrt2g = Math.sqrt(2 * g);

function theta(cdA: number, y0: number, zs = 0, qIn = 0, n = 0.5): Float64Array {
  const t = new Float64Array(THETA_SIZE);
  t[THETA.effectiveArea] = cdA;
  t[THETA.initialReading] = y0;
  t[THETA.sensorZero] = zs;
  t[THETA.inflow] = qIn;
  t[THETA.exponent] = n;
  return t;
}

const none = new Int32Array(0);

/** Level reached at each time by the ODE solution, for a drain from H0 with the outlet at the bottom. */
function odeLevelsAt(setting: DrainSetting, cdA: number, h0: number, times: number[]): number[] {
  const ts = Float64Array.from(times);
  const out = new Float64Array(ts.length);
  expect(odeReadings(setting, theta(cdA, h0), ts, out, null, none)).toBe(true);
  return Array.from(out);
}

describe('drain-time integrals: ODE against closed forms (ordinary calculus, t = ∫A(η)dη / (Cd·a·sqrt(2gη)))', () => {
  const cdA = 0.61 * Math.PI * 0.025 ** 2;
  const levels = [1.6, 1.2, 0.8, 0.5, 0.3];

  it('cone, apex down, outlet at the apex: t = α/(Cd·a·√2g)·(2/5)(H0^5/2 − H^5/2)', () => {
    const shape = cone(1.2, 2.0);
    const alpha = Math.PI * (1.2 / 2.0) ** 2;
    const h0 = 1.9;
    const times = levels.map((h) => (alpha / (cdA * sqrt2g)) * 0.4 * (h0 ** 2.5 - h ** 2.5));
    const got = odeLevelsAt({ shape, outletElevationM: 0, gravity: g }, cdA, h0, times);
    got.forEach((y, i) => expect(Math.abs(y - levels[i])).toBeLessThan(1e-6));
  });

  it('sphere, outlet at the bottom: t = π/(Cd·a·√2g)·[(2D/3)(H0^3/2 − H^3/2) − (2/5)(H0^5/2 − H^5/2)]', () => {
    const D = 2.2;
    const h0 = 2.0;
    const times = levels.map(
      (h) =>
        (Math.PI / (cdA * sqrt2g)) *
        (((2 * D) / 3) * (h0 ** 1.5 - h ** 1.5) - 0.4 * (h0 ** 2.5 - h ** 2.5)),
    );
    const got = odeLevelsAt({ shape: sphere(D), outletElevationM: 0, gravity: g }, cdA, h0, times);
    got.forEach((y, i) => expect(Math.abs(y - levels[i])).toBeLessThan(1e-6));
  });

  it('horizontal cylinder, outlet at the bottom: t = 2L/(Cd·a·√2g)·(2/3)[(D − H)^3/2 − (D − H0)^3/2]', () => {
    const D = 2.0;
    const L = 5.0;
    const h0 = 1.8;
    const times = levels.map(
      (h) => ((2 * L) / (cdA * sqrt2g)) * (2 / 3) * ((D - h) ** 1.5 - (D - h0) ** 1.5),
    );
    const got = odeLevelsAt(
      { shape: horizontalCylinder(D, L), outletElevationM: 0, gravity: g },
      cdA,
      h0,
      times,
    );
    got.forEach((y, i) => expect(Math.abs(y - levels[i])).toBeLessThan(1e-6));
  });

  it('vertical cylinder: ODE and closed form agree, with the outlet above the bottom and an offset sensor', () => {
    const setting: DrainSetting = { shape: cylinder(3), outletElevationM: 0.15, gravity: g };
    const ts = Float64Array.from({ length: 200 }, (_, i) => i * 40);
    const a = new Float64Array(ts.length);
    const b = new Float64Array(ts.length);
    const th = theta(4e-4, 2.9, 0.05);
    closedFormReadings(setting, th, ts, a, null, none);
    odeReadings(setting, th, ts, b, null, none);
    for (let i = 0; i < ts.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-7);
  });

  it('closed form for a free exponent matches the ODE', () => {
    const setting: DrainSetting = { shape: cylinder(2), outletElevationM: 0, gravity: g };
    const ts = Float64Array.from({ length: 100 }, (_, i) => i * 30);
    const a = new Float64Array(ts.length);
    const b = new Float64Array(ts.length);
    const th = theta(3e-4, 2.5, 0, 0, 0.62);
    closedFormReadings(setting, th, ts, a, null, none);
    odeReadings(setting, th, ts, b, null, none);
    for (let i = 0; i < ts.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-7);
  });

  it('with inflow the level settles at the head where Cd·a·√(2gH) = Q_in', () => {
    const setting: DrainSetting = { shape: cylinder(1), outletElevationM: 0, gravity: g };
    const cdA2 = 2e-4;
    const qIn = 4e-4;
    const hEq = (qIn / cdA2) ** 2 / (2 * g);
    const out = new Float64Array(1);
    odeReadings(setting, theta(cdA2, 1.5, 0, qIn), Float64Array.of(50_000), out, null, none);
    expect(Math.abs(out[0] - hEq)).toBeLessThan(1e-6);
  });
});

describe('derivatives: closed form and sensitivity equations against central differences', () => {
  const cases: {
    name: string;
    setting: DrainSetting;
    th: Float64Array;
    free: number[];
    solver: typeof odeReadings;
  }[] = [
    {
      name: 'closed form n=½',
      setting: { shape: cylinder(3), outletElevationM: 0.1, gravity: g },
      th: theta(7e-4, 3.2, 0.02),
      free: [0, 1, 2],
      solver: closedFormReadings,
    },
    {
      name: 'closed form free n',
      setting: { shape: cylinder(3), outletElevationM: 0.1, gravity: g },
      th: theta(7e-4, 3.2, 0.02, 0, 0.55),
      free: [0, 1, 2, 4],
      solver: closedFormReadings,
    },
    {
      name: 'ODE sphere, all terms',
      setting: { shape: sphere(2.4), outletElevationM: 0.05, gravity: g },
      th: theta(5e-4, 2.0, 0.1, 1e-4, 0.5),
      free: [0, 1, 2, 3, 4],
      solver: odeReadings,
    },
    {
      name: 'ODE horizontal cylinder',
      setting: { shape: horizontalCylinder(2.4, 6), outletElevationM: 0, gravity: g },
      th: theta(4.4e-4, 2.2),
      free: [0, 1],
      solver: odeReadings,
    },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const ts = Float64Array.from({ length: 60 }, (_, i) => i * 60);
      const free = Int32Array.from(c.free);
      const k = free.length;
      const y = new Float64Array(ts.length);
      const J = new Float64Array(ts.length * k);
      expect(c.solver(c.setting, c.th, ts, y, J, free)).toBe(true);
      for (let col = 0; col < k; col++) {
        const j = free[col];
        const step = 1e-6 * Math.max(Math.abs(c.th[j]), j === THETA.inflow ? 1e-4 : 1e-3);
        const up = Float64Array.from(c.th);
        const dn = Float64Array.from(c.th);
        up[j] += step;
        dn[j] -= step;
        const yu = new Float64Array(ts.length);
        const yd = new Float64Array(ts.length);
        c.solver(c.setting, up, ts, yu, null, none);
        c.solver(c.setting, dn, ts, yd, null, none);
        let worst = 0;
        let scale = 0;
        for (let i = 0; i < ts.length; i++) {
          const fd = (yu[i] - yd[i]) / (2 * step);
          worst = Math.max(worst, Math.abs(fd - J[i * k + col]));
          scale = Math.max(scale, Math.abs(fd));
        }
        expect(worst / Math.max(scale, 1e-12)).toBeLessThan(1e-5);
      }
    });
  }
});
