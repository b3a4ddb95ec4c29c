import { describe, expect, it } from 'vitest';
import type { SystemModel } from '../../../server/core/system/model.js';
import { P, PER_VESSEL } from '../../../server/core/system/network.js';
import { levelsAfter, timeToLevel } from '../../../server/core/system/predict.js';
import { rig, truthTheta, TWO_FREE } from './fixtures.js';
import { seededRandom } from '../../../server/core/random/prng.js';

const g = 9.80665; // standard gravity (CGPM 1901)

function model(vessels: typeof TWO_FREE, cd: number[], rel = 0.004): SystemModel {
  const network = rig(vessels);
  const theta = truthTheta(
    network,
    cd,
    vessels.map(() => 1),
  );
  const free = Int32Array.from(network.vessels.map((_, i) => i * PER_VESSEL + P.effectiveArea));
  const k = free.length;
  const covariance = new Float64Array(k * k);
  for (let a = 0; a < k; a++) covariance[a * k + a] = (rel * theta[free[a]]) ** 2;
  return { network, theta, free, covariance, degreesOfFreedom: 300 };
}

describe('predictions with intervals', () => {
  it('drain time of one vessel matches t = (2A/(Cd·a·sqrt(2g)))·(sqrt(H0) − sqrt(H1)) (field notes, closed form)', () => {
    const m = model([{ ...TWO_FREE[0], to: null }], [0.61]);
    const v = m.network.vessels[0];
    const t = timeToLevel(m, Float64Array.of(2.0), [], 0, 0.5);
    const area = v.shape.areaM2(1);
    const exact =
      ((2 * area) / (m.theta[0] * Math.sqrt(2 * g))) *
      (Math.sqrt(2.0 - v.outletElevationM) - Math.sqrt(0.5 - v.outletElevationM));
    expect(Math.abs(t.value / exact - 1)).toBeLessThan(1e-6);
    // t ∝ 1/(Cd·a): u_r(t) = u_r(Cd·a)
    expect(Math.abs(t.standardUncertainty! / t.value / 0.004 - 1)).toBeLessThan(1e-3);
  });

  it('level after a time: delta-method spread agrees with Monte Carlo over Cd·a (two vessels, within 10 %)', () => {
    const m = model(TWO_FREE, [0.61, 0.63], 0.01);
    const start = Float64Array.of(2.0, 0.6);
    const at = levelsAfter(m, start, [], 300);
    const rng = seededRandom(9);
    const draws = 400;
    const xs: number[] = [];
    for (let d = 0; d < draws; d++) {
      const th = Float64Array.from(m.theta);
      for (const p of m.free) th[p] *= 1 + 0.01 * rng.normal();
      xs.push(levelsAfter({ ...m, theta: th, covariance: null }, start, [], 300)[1].value);
    }
    const mean = xs.reduce((a, b) => a + b, 0) / draws;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (draws - 1));
    expect(Math.abs(sd / at[1].standardUncertainty! - 1)).toBeLessThan(0.1);
  });
});
