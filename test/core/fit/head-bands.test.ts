import { describe, expect, it } from 'vitest';
import { simulateAndFit, type Scenario } from './simulated.js';

/**
 * Are the head bands' standard uncertainties the right size? Monte Carlo over seeds with a known
 * truth: the spread (sample standard deviation) of each band's Cd·a over the seeds should match the
 * u the band states. With 60 seeds the sample SD itself is uncertain by about 1/√(2·59) ≈ 9 %, so
 * the ratio is accepted within 0.7–1.4 (about ±3.5 of those 9 %). Without the AR(1) correction, at
 * ρ = 0.85 the ratio would be about √((1+ρ)/(1−ρ)) ≈ 3.5.
 */
const d = 0.04;
const truth = (0.61 * (Math.PI * d * d)) / 4;

function spreadOverStated(noiseLag1: number, seeds: number): number[] {
  const bands: { area: number[]; u: number[] }[] = [];
  for (let seed = 1; seed <= seeds; seed++) {
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
        seed: 2000 + seed,
      },
    };
    const { result } = simulateAndFit(sc, false);
    expect(result.headBands.length).toBe(4);
    result.headBands.forEach((b, i) => {
      bands[i] ??= { area: [], u: [] };
      bands[i].area.push(b.effectiveAreaM2);
      bands[i].u.push(b.standardUncertainty);
    });
  }
  return bands.map((b) => sd(b.area) / mean(b.u));
}

const mean = (x: number[]) => x.reduce((s, v) => s + v, 0) / x.length;
const sd = (x: number[]) => {
  const m = mean(x);
  return Math.sqrt(x.reduce((s, v) => s + (v - m) ** 2, 0) / (x.length - 1));
};

describe('Cd·a by head band: stated u against the spread over seeds', () => {
  it('white noise', () => {
    for (const r of spreadOverStated(0, 60)) {
      expect(r).toBeGreaterThan(0.7);
      expect(r).toBeLessThan(1.4);
    }
  });
  it('AR(1) noise with lag-1 correlation 0.85 (corrected like the whole fit)', () => {
    for (const r of spreadOverStated(0.85, 60)) {
      expect(r).toBeGreaterThan(0.7);
      expect(r).toBeLessThan(1.4);
    }
  });
});
