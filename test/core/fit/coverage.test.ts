import { describe, expect, it } from 'vitest';
import { simulateAndFit, type Scenario } from './simulated.js';

/**
 * Do the 95 % intervals of Cd·a cover the truth about 95 % of the time? Monte Carlo over seeds,
 * small enough to run in seconds: a vertical cylinder (closed form), 400 samples per drain.
 * With AR(1) noise of lag-1 correlation 0.85, uncorrected intervals would be about
 * sqrt((1+ρ)/(1−ρ)) ≈ 3.5 times too narrow and cover far less often.
 */
const d = 0.04;
const truth = (0.61 * (Math.PI * d * d)) / 4;

function coverage(noiseLag1: number, runs: number): number {
  let covered = 0;
  for (let seed = 1; seed <= runs; seed++) {
    const sc: Scenario = {
      shape: { kind: 'vertical-cylinder', diameterM: 2.5 },
      boreM: d,
      sim: {
        effectiveAreaM2: truth,
        initialSurfaceM: 3.0,
        sensorZeroElevationM: 0,
        drainS: 3990,
        sampleIntervalS: 10,
        noiseM: 0.003,
        noiseLag1,
        seed: 1000 + seed,
      },
    };
    const { result } = simulateAndFit(sc, true);
    const [lo, hi] = result.effectiveArea.ci95;
    if (lo <= truth && truth <= hi) covered++;
  }
  return covered / runs;
}

describe('95 % interval coverage (Monte Carlo, known truth)', () => {
  it('white noise: between 90 % and 99 %', () => {
    const c = coverage(0, 300);
    expect(c).toBeGreaterThanOrEqual(0.9);
    expect(c).toBeLessThanOrEqual(0.99);
  });
  it('AR(1) noise with lag-1 correlation 0.85: between 90 % and 99 % after the correction', () => {
    const c = coverage(0.85, 300);
    expect(c).toBeGreaterThanOrEqual(0.9);
    expect(c).toBeLessThanOrEqual(0.99);
  });
});
