import { describe, expect, it } from 'vitest';
import { closedFormInflowSensitivity } from '../../../server/core/drain/closed-form.js';
import { odeReadings } from '../../../server/core/drain/ode.js';
import { THETA, THETA_SIZE } from '../../../server/core/drain/parameters.js';
import { cylinder } from './shapes-for-tests.js';

/**
 * The closed-form ∂y/∂Q_in at Q_in = 0 (integrating factor, ordinary calculus) against the ODE's
 * forward sensitivity and against central differences of the ODE in Q_in.
 */
const g = 9.80665;
const setting = { shape: cylinder(3), outletElevationM: 0.1, gravity: g };
const th = new Float64Array(THETA_SIZE);
th[THETA.effectiveArea] = 7e-4;
th[THETA.initialReading] = 3.2;
th[THETA.sensorZero] = 0.02;
th[THETA.exponent] = 0.5;
// a drain of about 2 h: samples across it, and past the drained point (sensitivity 0)
const ts = Float64Array.from({ length: 60 }, (_, i) => i * 150);

describe('closed-form inflow sensitivity of a constant-area orifice drain', () => {
  it('agrees with the ODE sensitivity equations and with central differences of the ODE', () => {
    const closed = new Float64Array(ts.length);
    expect(closedFormInflowSensitivity(setting, th, ts, closed)).toBe(true);
    const y = new Float64Array(ts.length);
    const sens = new Float64Array(ts.length);
    expect(odeReadings(setting, th, ts, y, sens, Int32Array.of(THETA.inflow))).toBe(true);
    const dq = 1e-7;
    const up = new Float64Array(ts.length);
    const down = new Float64Array(ts.length);
    odeReadings(
      setting,
      Float64Array.from(th, (v, j) => (j === THETA.inflow ? dq : v)),
      ts,
      up,
      null,
      new Int32Array(0),
    );
    odeReadings(
      setting,
      Float64Array.from(th, (v, j) => (j === THETA.inflow ? -dq : v)),
      ts,
      down,
      null,
      new Int32Array(0),
    );
    let scale = 0;
    for (const s of closed) scale = Math.max(scale, Math.abs(s));
    expect(scale).toBeGreaterThan(100); // of order t/A: hundreds of m per m³/s here
    for (let i = 0; i < ts.length; i++) {
      expect(Math.abs(closed[i] - sens[i])).toBeLessThan(1e-5 * scale);
      // differences only well before the drained point, where ±Q_in changes the ending itself
      const head = y[i] + th[THETA.sensorZero] - setting.outletElevationM;
      if (head > 0.2)
        expect(Math.abs(closed[i] - (up[i] - down[i]) / (2 * dq))).toBeLessThan(1e-4 * scale);
    }
    expect(closed[1]).toBeCloseTo(ts[1] / setting.shape.areaM2(0), 0); // starts as t/A
  });

  it('is refused outside n = ½ or at Cd·a = 0, so the caller falls back to the ODE', () => {
    const out = new Float64Array(ts.length);
    expect(
      closedFormInflowSensitivity(
        setting,
        Float64Array.from(th, (v, j) => (j === THETA.exponent ? 0.6 : v)),
        ts,
        out,
      ),
    ).toBe(false);
    expect(
      closedFormInflowSensitivity(
        setting,
        Float64Array.from(th, (v, j) => (j === THETA.effectiveArea ? 0 : v)),
        ts,
        out,
      ),
    ).toBe(false);
  });
});
