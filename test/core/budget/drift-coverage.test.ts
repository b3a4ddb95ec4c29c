import { describe, expect, it } from 'vitest';
import { simulateDrainTest } from '../../../server/core/drain/simulate.js';
import { seededRandom } from '../../../server/core/random/prng.js';
import { fitDrain } from '../../../server/core/fit/fit-drain.js';
import { fCdf } from '../../../server/core/stats/index.js';
import type { VesselSpec } from '../../../server/core/vessel/schema.js';
import { settingFor } from '../fit/simulated.js';
import { budgetOf } from './budget-helpers.js';

/**
 * Coverage of the budget's 95 % interval of Cd·a with known truth (only the fit's scatter varies:
 * no tolerances stated). A 6 m vertical cylinder with a 12 mm outlet drains from 3 m over about
 * three days. Monte Carlo standard error of a coverage p over N runs: √(p(1−p)/N), 2.1 % at
 * p = 0.95, N = 100; 3.6 % at p = 0.85.
 */
const d = 0.012;
const truth = (0.61 * Math.PI * d * d) / 4;
const vessel = {
  name: 'sim',
  shape: { kind: 'vertical-cylinder', diameterM: 6 },
  outlet: { boreM: d, elevationM: 0 },
  sensor: { zeroElevationM: 0 },
} as VesselSpec;
const setting = settingFor(vessel.shape, 0);

function run(kind: 'drift' | 'white' | 'ar1', runs: number) {
  let covered = 0;
  let coveredAr1Only = 0;
  let widened = 0;
  const est: number[] = [];
  const us: number[] = [];
  for (let seed = 1; seed <= runs; seed++) {
    const noise =
      kind === 'ar1' ? { noiseM: 0.003, noiseLag1: 0.85 } : { noiseM: 0.003, noiseLag1: 0 };
    const log = simulateDrainTest({
      setting,
      effectiveAreaM2: truth,
      initialSurfaceM: 3,
      sensorZeroElevationM: 0,
      sampleIntervalS: kind === 'drift' ? 60 : 10,
      drainS: kind === 'drift' ? 3 * 86400 : 3990,
      seed: 500 + seed,
      ...noise,
    });
    if (kind === 'drift') {
      // a daily swing of 3 mm (sensor temperature), random phase
      const phase = 2 * Math.PI * seededRandom(9000 + seed).uniform();
      for (let i = 0; i < log.levelM.length; i++)
        log.levelM[i] += 0.003 * Math.sin((2 * Math.PI * log.timeS[i]) / 86400 + phase);
    }
    let end = log.levelM.length;
    while (end > 10 && log.levelM[end - 1] < 0.45) end--;
    const data = { timeS: log.timeS.subarray(0, end), levelM: log.levelM.subarray(0, end) };
    const fit = fitDrain({
      setting,
      ...data,
      knownSensorZeroM: 0,
      terms: { inflow: false, datum: false, exponent: false },
      outlet: { boreM: d },
      essentialsOnly: true,
    });
    const b = budgetOf(vessel, fit, data, {}, true);
    const q = b.effectiveAreaM2;
    if (q.ci95[0] <= truth && truth <= q.ci95[1]) covered++;
    if (fit.effectiveArea.ci95[0] <= truth && truth <= fit.effectiveArea.ci95[1]) coveredAr1Only++;
    if (b.typeA.drift.varianceFactor > 1) widened++;
    est.push(q.value);
    us.push(q.combinedStandardUncertainty);
  }
  const mean = est.reduce((a, x) => a + x, 0) / runs;
  const sd = Math.sqrt(est.reduce((a, x) => a + (x - mean) ** 2, 0) / (runs - 1));
  return {
    coverage: covered / runs,
    ar1Only: coveredAr1Only / runs,
    uOverSd: us.reduce((a, x) => a + x, 0) / runs / sd,
    widened: widened / runs,
  };
}

describe('systematic drift: delete-a-block jackknife and head bands against the AR(1) estimate', () => {
  it('a 3 mm daily swing over a three-day drain: covered ≥ 85 % (the AR(1) correction alone: far less)', () => {
    const r = run('drift', 100);
    expect(r.coverage).toBeGreaterThanOrEqual(0.85);
    // the case the issue reports (25 %): AR(1) alone misses most of the time here too (measured 0.30)
    expect(r.ar1Only).toBeLessThan(0.6);
    expect(r.widened).toBeGreaterThan(0.9);
  }, 120_000);

  it('white noise: 90–99 % coverage, u/σ within 0.7–1.6, rarely widened', () => {
    const r = run('white', 100);
    expect(r.coverage).toBeGreaterThanOrEqual(0.9);
    expect(r.coverage).toBeLessThanOrEqual(0.99);
    expect(r.uOverSd).toBeGreaterThan(0.7);
    expect(r.uOverSd).toBeLessThan(1.6);
    expect(r.widened).toBeLessThan(0.2);
  }, 120_000);

  it('AR(1) noise, ρ = 0.85: 90–99 % coverage, u/σ within 0.7–1.6, rarely widened', () => {
    const r = run('ar1', 100);
    expect(r.coverage).toBeGreaterThanOrEqual(0.9);
    expect(r.coverage).toBeLessThanOrEqual(0.99);
    expect(r.uOverSd).toBeGreaterThan(0.7);
    expect(r.uOverSd).toBeLessThan(1.6);
    expect(r.widened).toBeLessThan(0.2);
  }, 120_000);

  it('the χ²/ν limits are the 99 % points: F(ν, ∞) at them is 0.99', () => {
    // χ²(ν)/ν is F(ν, ∞); a very large second degree of freedom stands in for ∞
    const limits: Record<number, number> = { 3: 3.782, 9: 2.407 };
    for (const [nu, x] of Object.entries(limits))
      expect(fCdf(x, Number(nu), 1e8)).toBeCloseTo(0.99, 3);
  });
});
