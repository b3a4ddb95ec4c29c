import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { describe, expect, it } from 'vitest';
import { simulateDrainTest } from '../../../server/core/drain/simulate.js';
import { fitDrain } from '../../../server/core/fit/fit-drain.js';
import { THETA } from '../../../server/core/drain/parameters.js';
import { g, settingFor } from './simulated.js';

/**
 * Independent reference solver: ml-levenberg-marquardt 5.1.0 (npm) on the same drain problems.
 * Given its weaknesses (no convergence test, additive damping, absolute difference steps), it gets
 * well-scaled parameters (Cd·a in cm²), the analytic Jacobian and a full iteration budget.
 */
describe('drain fits against ml-levenberg-marquardt', () => {
  it('vertical cylinder: same Cd·a and initial level, and no larger sum of squares', () => {
    const D = 2.5;
    const A = (Math.PI * D * D) / 4;
    const setting = settingFor({ kind: 'vertical-cylinder', diameterM: D });
    const log = simulateDrainTest({
      setting,
      effectiveAreaM2: 7.5e-4,
      initialSurfaceM: 3,
      sensorZeroElevationM: 0,
      sampleIntervalS: 10,
      drainS: 3000,
      noiseM: 0.002,
      seed: 3,
    });
    const ours = fitDrain({
      setting,
      timeS: log.timeS,
      levelM: log.levelM,
      knownSensorZeroM: 0,
      terms: { inflow: false, datum: false, exponent: false },
      outlet: { boreM: 0.04 },
      essentialsOnly: true,
    });

    const k = Math.sqrt(2 * g) / (2 * A) / 1e4; // per cm² of Cd·a
    const x = Array.from(log.timeS);
    const y = Array.from(log.levelM);
    const model =
      ([cm2, y0]: number[]) =>
      (t: number) => {
        const u = Math.sqrt(y0) - k * cm2 * t;
        return u > 0 ? u * u : 0;
      };
    const jac =
      ([cm2, y0]: number[]) =>
      (t: number) => {
        const u = Math.sqrt(y0) - k * cm2 * t;
        return u > 0 ? [-2 * u * k * t, u / Math.sqrt(y0)] : [0, 0];
      };
    const ref = levenbergMarquardt({ x, y }, model, {
      initialValues: [6, 2.9],
      jacobianFunction: jac,
      maxIterations: 300,
      errorTolerance: 0,
      damping: 1e-2,
    });
    const refArea = ref.parameterValues[0] * 1e-4;
    expect(Math.abs(ours.variant.theta[THETA.effectiveArea] / refArea - 1)).toBeLessThan(1e-6);
    expect(
      Math.abs(ours.variant.theta[THETA.initialReading] - ref.parameterValues[1]),
    ).toBeLessThan(1e-6);
    expect(ours.solver.sumSquares).toBeLessThanOrEqual(ref.parameterError * (1 + 1e-9));
  });
});
