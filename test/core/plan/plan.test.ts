import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { simulateDrainTest } from '../../../server/core/drain/simulate.js';
import { makeShape } from '../../../server/core/geometry/index.js';
import { fitDrain } from '../../../server/core/fit/fit-drain.js';
import { InputError } from '../../../server/core/errors.js';
import {
  planDrainTest,
  planRequestSchema,
  type PlanRequestInput,
  type PlannedTest,
} from '../../../server/core/plan/index.js';
import { parseVesselFile, type VesselSpec } from '../../../server/core/vessel/schema.js';
import { chiSquareCdf } from '../../../server/core/trend/chisquare.js';

const g = 9.80665;
const fb1 = parseVesselFile(
  readFileSync(
    new URL('../../../sample-data/backwash-tank-fb1.vessel.json', import.meta.url),
    'utf8',
  ),
  'fb1',
);
const sensor = { resolutionM: 0.001, noiseM: 0.0015, sampleIntervalS: 1 };
/** χ² quantile by bisection on the project's CDF (itself checked against @stdlib in test/core/trend/chisquare.test.ts). */
function chiSquareQuantile(p: number, dof: number): number {
  let lo = 0;
  let hi = 10 * dof;
  for (let k = 0; k < 100; k++) {
    const mid = 0.5 * (lo + hi);
    if (chiSquareCdf(mid, dof) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

const plan = (req: PlanRequestInput, vessel: VesselSpec = fb1) =>
  planDrainTest(vessel, planRequestSchema.parse(req));

/**
 * Monte Carlo fits of tests made to a plan: simulate the drain from the planned start with the
 * planned sensor (project simulator: AR(1) noise, rounding), cut the planned window, fit
 * Cd·a and the first reading (datum known, as FB-1's file gives it), and return the standard
 * deviation of Cd·a over the seeds relative to the truth.
 */
function monteCarloSpread(
  vessel: VesselSpec,
  t: PlannedTest,
  noise: { noiseM: number; resolutionM: number; lag1: number; dt: number },
  seeds: number,
): { relSd: number; relBias: number } {
  const zs = vessel.sensor?.zeroElevationM ?? 0;
  const setting = {
    shape: makeShape(vessel.shape),
    outletElevationM: vessel.outlet.elevationM,
    gravity: g,
  };
  const values: number[] = [];
  for (let seed = 1; seed <= seeds; seed++) {
    const log = simulateDrainTest({
      setting,
      effectiveAreaM2: t.effectiveAreaM2,
      initialSurfaceM: t.startLevelM + zs,
      sensorZeroElevationM: zs,
      sampleIntervalS: noise.dt,
      drainS: t.windowEndS,
      noiseM: noise.noiseM,
      noiseLag1: noise.lag1,
      quantumM: noise.resolutionM,
      seed: 1000 + seed,
    });
    const first = Math.round(t.windowStartS / noise.dt);
    const timeS = log.timeS
      .slice(first, first + t.samplesInWindow)
      .map((x) => x - log.timeS[first]);
    const levelM = log.levelM.slice(first, first + t.samplesInWindow);
    const fit = fitDrain({
      setting,
      timeS,
      levelM,
      knownSensorZeroM: zs,
      terms: { inflow: false, datum: false, exponent: false },
      outlet: { boreM: vessel.outlet.boreM },
      essentialsOnly: true,
    });
    values.push(fit.effectiveArea.value);
  }
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const sd = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
  return { relSd: sd / t.effectiveAreaM2, relBias: (mean - t.effectiveAreaM2) / t.effectiveAreaM2 };
}

describe('drain-test planner: drain time, volume, peak flow', () => {
  it('FB-1 from 3.5 m: drain time within 0.5 % of the closed form t = 2A/(Cd·a·√2g)·(√H0 − √H1) (field notes, Torricelli)', () => {
    const r = plan({ startLevelM: 3.5, sensor });
    const t = r.test!;
    const area = (Math.PI * 3.2 ** 2) / 4;
    const cdA = 0.61 * ((Math.PI * 0.05 ** 2) / 4);
    const h0 = 3.5 + 0.1 - 0.1; // reading above the sensor zero at the outlet
    const closed = (h1: number) =>
      ((2 * area) / (cdA * Math.sqrt(2 * g))) * (Math.sqrt(h0) - Math.sqrt(h1));
    expect(Math.abs(t.drainTimeToOutletS / closed(0) - 1)).toBeLessThan(0.005);
    expect(Math.abs(t.drainTimeToEndS / closed(t.endLevelM) - 1)).toBeLessThan(0.005);
    // volume between the levels: π·D²/4·Δh; peak outflow Cd·a·√(2g·H0) in L/s
    expect(t.volumeDischargedM3).toBeCloseTo(area * (3.5 - t.endLevelM), 9);
    expect(t.peakOutflowLS).toBeCloseTo(cdA * Math.sqrt(2 * g * h0) * 1000, 9);
    // the curve starts at the peak and falls with the level
    expect(t.curve.outflowLS[0]).toBeCloseTo(t.peakOutflowLS, 9);
    expect(t.curve.levelM.at(-1)).toBeCloseTo(t.endLevelM, 9);
  });

  it('a sphere, outlet at the bottom: t = π/(Cd·a·√2g)·[(2D/3)(H0^3/2 − H^3/2) − (2/5)(H0^5/2 − H^5/2)] (ordinary calculus)', () => {
    const D = 2.4;
    const vessel = {
      ...fb1,
      shape: { kind: 'sphere' as const, diameterM: D },
      outlet: { ...fb1.outlet, elevationM: 0 },
      sensor: { zeroElevationM: 0 },
    };
    const r = plan({ startLevelM: 2.0, levelsM: [1.2, 0.3], sensor }, vessel);
    const cdA = 0.61 * ((Math.PI * 0.05 ** 2) / 4);
    const exact = (h0: number, h: number) =>
      (Math.PI / (cdA * Math.sqrt(2 * g))) *
      (((2 * D) / 3) * (h0 ** 1.5 - h ** 1.5) - 0.4 * (h0 ** 2.5 - h ** 2.5));
    expect(r.test!.timesToLevels[0].timeS! / exact(2, 1.2)).toBeCloseTo(1, 6);
    expect(r.test!.timesToLevels[1].timeS! / exact(2, 0.3)).toBeCloseTo(1, 6);
    expect(r.test!.drainTimeToOutletS / exact(2, 0)).toBeCloseTo(1, 6);
  });
});

describe('drain-test planner: predicted u against Monte Carlo fits of tests made to the plan', () => {
  it('FB-1 from 3.5 m, 1 mm resolution, 1.5 mm white noise, 1 s: u_r(Cd·a) within 25 % of the spread of 200 fits', () => {
    const t = plan({ startLevelM: 3.5, sensor }).test!;
    const mc = monteCarloSpread(
      fb1,
      t,
      { noiseM: 0.0015, resolutionM: 0.001, lag1: 0, dt: 1 },
      200,
    );
    const predicted = t.uncertainty.typeARelative;
    console.info(
      `FB-1 white: predicted u_r(Cd·a) ${predicted.toExponential(3)}, Monte Carlo spread ${mc.relSd.toExponential(3)} (ratio ${(predicted / mc.relSd).toFixed(3)}), bias ${mc.relBias.toExponential(2)}`,
    );
    expect(Math.abs(predicted / mc.relSd - 1)).toBeLessThan(0.25);
  });

  it('AR(1) noise (ρ = 0.8 per sample), 2 s sampling: the inflated prediction within 25 % of the spread of 200 fits', () => {
    const s = { resolutionM: 0.001, noiseM: 0.003, sampleIntervalS: 2, noiseLag1: 0.8 };
    const r = plan({ startLevelM: 3.5, endLevelM: 2.0, sensor: s });
    const t = r.test!;
    expect(r.assumptions.varianceInflation).toBeGreaterThan(5);
    const mc = monteCarloSpread(
      fb1,
      t,
      { noiseM: 0.003, resolutionM: 0.001, lag1: 0.8, dt: 2 },
      200,
    );
    const predicted = t.uncertainty.typeARelative;
    console.info(
      `FB-1 AR(1): predicted ${predicted.toExponential(3)}, Monte Carlo spread ${mc.relSd.toExponential(3)} (ratio ${(predicted / mc.relSd).toFixed(3)})`,
    );
    expect(Math.abs(predicted / mc.relSd - 1)).toBeLessThan(0.25);
  });
});

describe('drain-test planner: the least test for a target', () => {
  it('target u_r(Cd·a) 0.2 %: the shortest test from 3.5 m meets it in Monte Carlo, and one reading less would not be predicted to', () => {
    const r = plan({
      startLevelM: 3.5,
      sensor,
      target: { quantity: 'effective-area', relativeStandardUncertainty: 0.002 },
    });
    expect(r.target!.possible).toBe(true);
    const best = r.recommendation!.shortest!;
    expect(best.startLevelM).toBe(3.5);
    expect(best.uncertainty.effectiveAreaRelative).toBeLessThanOrEqual(0.002);
    const shorter = plan({ startLevelM: 3.5, endLevelM: best.endLevelM + 0.01, sensor }).test!;
    expect(shorter.uncertainty.effectiveAreaRelative).toBeGreaterThan(0.002);
    expect(best.durationS).toBeLessThan(r.test!.durationS / 5);
    const mc = monteCarloSpread(
      fb1,
      best,
      { noiseM: 0.0015, resolutionM: 0.001, lag1: 0, dt: 1 },
      200,
    );
    // "meets": the Monte Carlo SD is not significantly above the target (one-sided 95 %, chi-square with 199 dof)
    const bound = 0.002 * Math.sqrt(chiSquareQuantile(0.95, 199) / 199);
    console.info(
      `target 0.2 %: shortest ${best.durationS.toFixed(0)} s to ${best.endLevelM.toFixed(3)} m, Monte Carlo spread ${(mc.relSd * 100).toFixed(4)} % (bound ${(bound * 100).toFixed(4)} %)`,
    );
    expect(mc.relSd).toBeLessThanOrEqual(bound);
  });

  it('the lowest start level logged to the window end meets the target; 5 cm lower would not', () => {
    const r = plan({ sensor, target: { relativeStandardUncertainty: 0.0005 } });
    const low = r.recommendation!.lowestStart!;
    expect(low.uncertainty.effectiveAreaRelative).toBeLessThanOrEqual(0.0005);
    const lower = plan({ startLevelM: low.startLevelM - 0.05, sensor }).test!;
    expect(lower.uncertainty.effectiveAreaRelative).toBeGreaterThan(0.0005);
  });

  it('a Cd target below the bore tolerance cannot be met, and the plan says why', () => {
    const r = plan({
      startLevelM: 3.5,
      sensor,
      target: { quantity: 'discharge-coefficient', relativeStandardUncertainty: 0.002 },
    });
    // u_r(d) = 0.2 mm/√3 / 50 mm; Cd gets twice it (JCGM 100 rectangular, field notes)
    expect(r.target!.typeBFloorRelative).toBeCloseTo((2 * 0.0002) / Math.sqrt(3) / 0.05, 12);
    expect(r.target!.possible).toBe(false);
    expect(r.target!.reason).toMatch(/bore tolerance alone/);
    expect(r.recommendation).toBeNull();
  });

  it('a target no fill can meet at this interval names the interval that would', () => {
    const r = plan({
      sensor: { ...sensor, sampleIntervalS: 30 },
      target: { relativeStandardUncertainty: 0.00002 },
    });
    expect(r.target!.possible).toBe(false);
    const dt = r.recommendation!.sampleIntervalNeededS!;
    expect(dt).toBeLessThan(30);
    expect(
      plan({
        sensor: { ...sensor, sampleIntervalS: dt * 0.98 },
        target: { relativeStandardUncertainty: 0.00002 },
      }).target!.possible,
    ).toBe(true);
  });
});

describe('drain-test planner: safety and refusals', () => {
  it('the peak flow beside a stated discharge limit, with the highest start that keeps within it', () => {
    const r = plan({ startLevelM: 3.5, sensor, dischargeLimitLS: 8 });
    expect(r.discharge.withinLimit).toBe(false);
    expect(r.discharge.message).toMatch(/EXCEEDS the stated limit of 8 L\/s/);
    const ok = plan({
      startLevelM: r.discharge.highestStartWithinLimitM! - 1e-6,
      sensor,
      dischargeLimitLS: 8,
    });
    expect(ok.discharge.withinLimit).toBe(true);
    expect(r.cautions.join(' ')).toMatch(/confined/i);
  });

  it('refuses a plan with neither start nor target, a start above the top, and no noise at all, naming the field', () => {
    const field = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        return (e as InputError).field;
      }
      return 'accepted';
    };
    expect(field(() => plan({ sensor }))).toBe('startLevelM');
    expect(field(() => plan({ startLevelM: 4.5, sensor }))).toBe('startLevelM');
    expect(field(() => plan({ startLevelM: 3, sensor: { noiseM: 0, sampleIntervalS: 1 } }))).toBe(
      'sensor.noiseM',
    );
  });
});
