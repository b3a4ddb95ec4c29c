import { describe, expect, it } from 'vitest';
import type { SystemModel } from '../../../server/core/system/model.js';
import { P, PER_VESSEL } from '../../../server/core/system/network.js';
import {
  equilibrium,
  equilibriumSensitivity,
  steadyState,
  steadyStateMonteCarlo,
} from '../../../server/core/system/steady.js';
import { rig, THREE_MIXED, truthTheta, TWO_FREE } from './fixtures.js';

function model(vessels: typeof TWO_FREE, cd: number[], relU = 0.002): SystemModel {
  const network = rig(vessels);
  const theta = truthTheta(
    network,
    cd,
    vessels.map(() => 1),
  );
  const free = Int32Array.from(network.vessels.map((_, i) => i * PER_VESSEL + P.effectiveArea));
  const k = free.length;
  const covariance = new Float64Array(k * k);
  for (let a = 0; a < k; a++) covariance[a * k + a] = (relU * theta[free[a]]) ** 2;
  if (k > 1) covariance[1] = covariance[k] = 0.3 * Math.sqrt(covariance[0] * covariance[k + 1]);
  return { network, theta, free, covariance, degreesOfFreedom: 500 };
}

const g = 9.80665; // standard gravity (CGPM 1901)

describe('steady state of connected vessels', () => {
  it('free chain: H1/H2 = (Cd2·a2/(Cd1·a1))², and each head from Cd·a·sqrt(2gH) = Q (the series relation)', () => {
    const m = model(TWO_FREE, [0.61, 0.8]);
    const q = 0.002;
    const s = steadyState(m, Float64Array.of(q, 0));
    const c1 = m.theta[P.effectiveArea];
    const c2 = m.theta[PER_VESSEL + P.effectiveArea];
    const h1 = s.levelsM[0].value - m.network.vessels[0].outletElevationM;
    const h2 = s.levelsM[1].value - m.network.vessels[1].outletElevationM;
    expect(h1 / h2).toBeCloseTo((c2 / c1) ** 2, 10);
    expect(h1).toBeCloseTo((q / c1) ** 2 / (2 * g), 10);
    expect(s.flowsM3S[1]).toBeCloseTo(q, 12);
  });

  it('submerged link: Newton from the free-chain start reaches the cascade levels S_up = S_down + (Q/Cd·a)²/2g', () => {
    const m = model(THREE_MIXED, [0.62, 0.6, 0.64]);
    const q = 0.0015;
    const s = steadyState(m, Float64Array.of(q, 0, 0));
    expect(s.iterations).toBeGreaterThan(0);
    const [a, b] = m.network.vessels;
    const head = (i: number) => (q / m.theta[i * PER_VESSEL]) ** 2 / (2 * g);
    const sB = b.baseElevationM + b.outletElevationM + head(1);
    expect(a.baseElevationM + s.levelsM[0].value).toBeCloseTo(sB + head(0), 9);
  });

  it('exact equilibrium sensitivities agree with central differences of the equilibrium', () => {
    const m = model(THREE_MIXED, [0.62, 0.6, 0.64]);
    const q = Float64Array.of(0.0015, 0.0003, 0);
    const { eta } = equilibrium(m, m.theta, q);
    const sens = equilibriumSensitivity(m, m.theta, eta, q, m.free);
    for (let c = 0; c < 3; c++) {
      const h = 1e-6 * m.theta[m.free[c]];
      const up = Float64Array.from(m.theta);
      const dn = Float64Array.from(m.theta);
      up[m.free[c]] += h;
      dn[m.free[c]] -= h;
      const eu = equilibrium(m, up, q).eta;
      const ed = equilibrium(m, dn, q).eta;
      for (let i = 0; i < 3; i++) expect(sens[i * 3 + c]).toBeCloseTo((eu[i] - ed[i]) / (2 * h), 0);
      for (let i = 0; i < 3; i++)
        expect(Math.abs(sens[i * 3 + c] - (eu[i] - ed[i]) / (2 * h))).toBeLessThan(
          1e-5 * (Math.abs(sens[i * 3 + c]) + 1),
        );
    }
  });

  it('delta-method uncertainty of the levels agrees with Monte Carlo from the covariance (within 10 %)', () => {
    const m = model(THREE_MIXED, [0.62, 0.6, 0.64], 0.01);
    const q = Float64Array.of(0.0015, 0, 0);
    const s = steadyState(m, q);
    const mc = steadyStateMonteCarlo(m, q, 2000, 5);
    for (let i = 0; i < 3; i++)
      expect(Math.abs(mc[i] / s.levelsM[i].standardUncertainty! - 1)).toBeLessThan(0.1);
  });

  it('warns when an equilibrium lies above a vessel (it would overflow)', () => {
    const m = model(TWO_FREE, [0.61, 0.8]);
    const s = steadyState(m, Float64Array.of(0.01, 0));
    expect(s.warnings.join(' ')).toMatch(/T1: .*would overflow/);
  });
});
