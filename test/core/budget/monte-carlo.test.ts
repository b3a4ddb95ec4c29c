import { describe, expect, it } from 'vitest';
import { simulateDrainTest } from '../../../server/core/drain/simulate.js';
import { seededRandom } from '../../../server/core/random/prng.js';
import { fitDrain } from '../../../server/core/fit/fit-drain.js';
import type { VesselSpec } from '../../../server/core/vessel/schema.js';
import { settingFor } from '../fit/simulated.js';
import { budgetOf } from './budget-helpers.js';

/**
 * Validation of the GUM budget by Monte Carlo, as JCGM 101:2008 (GUM Supplement 1) prescribes:
 * draw every input from its stated distribution, re-simulate the drain with the drawn (true)
 * inputs, fit it with the nominal vessel file, and compare the distribution of Cd with the
 * budget's u_c(Cd) and 95 % interval (§8: the GUM result is validated when |y − U − y_low| and
 * |y + U − y_high| are within the numerical tolerance δ = ½·10^l of u_c = c·10^l, here with
 * n_dig = 1 significant digit, the coarser of the two choices §8.2 names: with M = 300 trials the
 * Monte Carlo standard error of the standard deviation is u/√(2M) ≈ 4 % of u and that of a 2.5 %
 * quantile about 7 % of u, too coarse for n_dig = 2 within this test's CPU budget).
 * The MC standard deviation is also required within 3 standard errors of u_c.
 *
 * A 3.2 m vertical cylinder with a ±10 mm diameter (the case), ±0.1 mm on a 50 mm bore,
 * ±2 mm on the outlet and sensor-zero elevations, ±0.1 % span, ±50 ppm clock, 2 mm white noise.
 */
const D = 3.2;
const bore = 0.05;
const trueCd = 0.61;
const vessel = {
  name: 'mc',
  shape: { kind: 'vertical-cylinder', diameterM: D, diameterToleranceM: 0.01 },
  outlet: { boreM: bore, boreToleranceM: 0.0001, elevationM: 0.1, elevationToleranceM: 0.002 },
  sensor: { zeroElevationM: 0.1, zeroElevationToleranceM: 0.002, spanErrorFraction: 0.001 },
  logger: { clockRateErrorFraction: 5e-5 },
} as VesselSpec;
const nominalSetting = settingFor(vessel.shape, 0.1);

function trial(seed: number, drawn: boolean) {
  const r = seededRandom(70_000 + seed);
  const pm = (half: number) => (drawn ? (2 * r.uniform() - 1) * half : 0);
  const dTrue = D + pm(0.01);
  const boreTrue = bore + pm(0.0001);
  const outletTrue = 0.1 + pm(0.002);
  const zeroTrue = 0.1 + pm(0.002);
  const span = pm(0.001);
  const clock = pm(5e-5);
  const setting = settingFor({ kind: 'vertical-cylinder', diameterM: dTrue }, outletTrue);
  const cdA = (trueCd * Math.PI * boreTrue * boreTrue) / 4;
  const log = simulateDrainTest({
    setting,
    effectiveAreaM2: cdA,
    initialSurfaceM: 3,
    sensorZeroElevationM: zeroTrue,
    sampleIntervalS: 10,
    drainS: 4000,
    noiseM: 0.002,
    seed: 90_000 + seed,
  });
  // what the logger records: the sensor's scale error on the readings, its clock's rate on the times
  const levelM = log.levelM.map((y) => y * (1 + span));
  const timeS = log.timeS.map((t) => t * (1 + clock));
  let end = levelM.length;
  while (end > 10 && levelM[end - 1] < 0.3) end--;
  const data = { timeS: timeS.subarray(0, end), levelM: levelM.subarray(0, end) };
  const fit = fitDrain({
    setting: nominalSetting,
    ...data,
    knownSensorZeroM: 0.1,
    terms: { inflow: false, datum: false, exponent: false },
    outlet: { boreM: bore, boreToleranceM: 0.0001 },
    essentialsOnly: true,
  });
  return { fit, data, cd: fit.variant.theta[0] / ((Math.PI * bore * bore) / 4) };
}

describe('JCGM 101:2008 Monte Carlo validation of the budget', () => {
  it('u_c(Cd) and the 95 % interval agree with 300 Monte Carlo trials (§8, n_dig = 1)', () => {
    const nominal = trial(0, false);
    const budget = budgetOf(vessel, nominal.fit, nominal.data);
    const u = budget.dischargeCoefficient.combinedStandardUncertainty;
    const U = budget.dischargeCoefficient.expandedUncertainty;
    const M = 300;
    const cds = Array.from({ length: M }, (_, i) => trial(i + 1, true).cd).sort((a, b) => a - b);
    const mean = cds.reduce((a, x) => a + x, 0) / M;
    const sd = Math.sqrt(cds.reduce((a, x) => a + (x - mean) ** 2, 0) / (M - 1));
    // probabilistically symmetric 95 % interval from the sorted trials (JCGM 101 7.7)
    const low = cds[Math.round(0.025 * M)];
    const high = cds[Math.round(0.975 * M) - 1];
    const l = Math.floor(Math.log10(u)); // u = c·10^l, one significant digit
    const delta = 0.5 * 10 ** l;
    const seSd = u / Math.sqrt(2 * (M - 1)); // MC standard error of the standard deviation
    expect(Math.abs(sd - u), `MC sd ${sd} vs budget u ${u} (SE ${seSd})`).toBeLessThan(
      Math.min(delta, 3 * seSd),
    );
    // the GUM interval about the MC mean (the budget's y is one fit; MC's centre is the truth)
    expect(Math.abs(mean - U - low), `low end: ${mean - U} vs ${low}, δ ${delta}`).toBeLessThan(
      delta,
    );
    expect(Math.abs(mean + U - high), `high end: ${mean + U} vs ${high}, δ ${delta}`).toBeLessThan(
      delta,
    );
    // no bias: the MC mean within 3 standard errors (u/√M) of the true Cd
    expect(Math.abs(mean - trueCd)).toBeLessThan((3 * u) / Math.sqrt(M));
    // the diameter is the largest contribution to Cd·a, as the issue requires
    const big = budget.lines
      .filter((x) => x.counted && x.key !== 'outlet.boreM')
      .sort((a, b) => b.contributionEffectiveArea - a.contributionEffectiveArea)[0];
    expect(big.key).toBe('shape.diameterM');
  }, 120_000);
});
