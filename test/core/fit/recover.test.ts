import { describe, expect, it } from 'vitest';
import { THETA } from '../../../server/core/drain/parameters.js';
import { simulateAndFit, type Scenario } from './simulated.js';

/**
 * Known truth: drains simulated by the project's ODE (itself checked against the closed-form
 * drain-time integrals), with 1 mm white noise and 1 mm quantisation, fitted back. Cd must come
 * back within 0.5 % and the 95 % interval must contain it.
 */
const bore = 0.04;
const a = (Math.PI * bore * bore) / 4;
const base = { sampleIntervalS: 2, noiseM: 0.001, quantumM: 0.001, seed: 7 };

const scenarios: [string, Scenario][] = [
  [
    'vertical cylinder',
    {
      shape: { kind: 'vertical-cylinder', diameterM: 2.5 },
      boreM: bore,
      sim: {
        ...base,
        effectiveAreaM2: 0.61 * a,
        initialSurfaceM: 3.0,
        sensorZeroElevationM: 0,
        drainS: 3600,
      },
    },
  ],
  [
    'vertical cylinder, outlet above the bottom, sensor zero fitted',
    {
      shape: { kind: 'vertical-cylinder', diameterM: 2.5 },
      outletElevationM: 0.2,
      boreM: bore,
      knownZero: false,
      terms: { datum: true },
      sim: {
        ...base,
        effectiveAreaM2: 0.63 * a,
        initialSurfaceM: 3.2,
        sensorZeroElevationM: 0.35,
        drainS: 5400,
      },
    },
  ],
  [
    'vertical cylinder with a leaking inlet',
    {
      shape: { kind: 'vertical-cylinder', diameterM: 2.5 },
      boreM: bore,
      terms: { inflow: true },
      sim: {
        ...base,
        effectiveAreaM2: 0.61 * a,
        inflowM3S: 4e-4,
        initialSurfaceM: 3.0,
        sensorZeroElevationM: 0,
        drainS: 3600,
      },
    },
  ],
  [
    'vertical cylinder, exponent free',
    {
      shape: { kind: 'vertical-cylinder', diameterM: 2.0 },
      boreM: bore,
      terms: { exponent: true },
      sim: {
        ...base,
        effectiveAreaM2: 0.62 * a,
        initialSurfaceM: 3.0,
        sensorZeroElevationM: 0,
        drainS: 3000,
      },
    },
  ],
  [
    'rectangular',
    {
      shape: { kind: 'rectangular', lengthM: 2, widthM: 1.5 },
      boreM: bore,
      sim: {
        ...base,
        effectiveAreaM2: 0.6 * a,
        initialSurfaceM: 2.0,
        sensorZeroElevationM: 0.0,
        drainS: 2400,
      },
    },
  ],
  [
    'horizontal cylinder',
    {
      shape: { kind: 'horizontal-cylinder', diameterM: 2.4, lengthM: 6 },
      boreM: 0.05,
      sim: {
        ...base,
        effectiveAreaM2: 0.62 * Math.PI * 0.025 ** 2,
        initialSurfaceM: 2.2,
        sensorZeroElevationM: 0,
        drainS: 3600,
      },
    },
  ],
  [
    'sphere',
    {
      shape: { kind: 'sphere', diameterM: 3 },
      boreM: 0.05,
      sim: {
        ...base,
        effectiveAreaM2: 0.61 * Math.PI * 0.025 ** 2,
        initialSurfaceM: 2.7,
        sensorZeroElevationM: 0.05,
        drainS: 3600,
      },
    },
  ],
  [
    'cone bottom',
    {
      shape: { kind: 'cone-bottom', diameterM: 2, coneHeightM: 1.2, heightM: 4 },
      boreM: bore,
      sim: {
        ...base,
        effectiveAreaM2: 0.61 * a,
        initialSurfaceM: 3.5,
        sensorZeroElevationM: 0,
        drainS: 3000,
      },
    },
  ],
  [
    'stage–area table',
    {
      shape: {
        kind: 'table',
        points: [
          [0, 0.5],
          [0.5, 1.5],
          [1.0, 2.6],
          [2.0, 4.0],
          [3.0, 5.0],
        ],
      },
      boreM: bore,
      sim: {
        ...base,
        effectiveAreaM2: 0.61 * a,
        initialSurfaceM: 2.8,
        sensorZeroElevationM: 0,
        drainS: 3000,
      },
    },
  ],
  [
    'elliptical-head cylinder',
    {
      shape: { kind: 'elliptical-head-cylinder', diameterM: 2, heightM: 4 },
      boreM: bore,
      sim: {
        ...base,
        effectiveAreaM2: 0.64 * a,
        initialSurfaceM: 3.5,
        sensorZeroElevationM: 0,
        drainS: 3000,
      },
    },
  ],
];

describe('Cd recovered from simulated drains of every shape and option', () => {
  for (const [name, sc] of scenarios) {
    it(name, () => {
      const { result, trueCd } = simulateAndFit(sc);
      expect(result.solver.converged).toBe(true);
      const cd = result.dischargeCoefficient;
      expect(Math.abs(cd.value / trueCd - 1)).toBeLessThan(0.005);
      expect(cd.ci95[0]).toBeLessThan(trueCd);
      expect(cd.ci95[1]).toBeGreaterThan(trueCd);
      if (sc.terms?.inflow) {
        const q = result.variant.theta[THETA.inflow];
        expect(Math.abs(q / (sc.sim.inflowM3S ?? 1) - 1)).toBeLessThan(0.05);
      }
      if (sc.terms?.datum) {
        expect(
          Math.abs(result.variant.theta[THETA.sensorZero] - sc.sim.sensorZeroElevationM),
        ).toBeLessThan(0.01);
      }
      if (sc.terms?.exponent) {
        expect(Math.abs(result.variant.theta[THETA.exponent] - 0.5)).toBeLessThan(0.01);
      }
    });
  }
});

describe('what the fit reports beside the numbers', () => {
  it('a missing inflow term is noticed by the model comparison', () => {
    const sc = scenarios[2][1];
    const { result } = simulateAndFit({ ...sc, terms: {} });
    const row = result.comparison!.rows.find((r) => r.term === 'inflow')!;
    expect(row.change).toBe('with');
    expect(row.fTest!.pValue).toBeLessThan(1e-3);
    expect(row.deltaAic).toBeLessThan(0);
    expect(result.warnings.map((w) => w.code)).toContain('term-suggested');
  });

  it('an unneeded inflow term is reported as not supported', () => {
    const sc = scenarios[0][1];
    const { result } = simulateAndFit({ ...sc, terms: { inflow: true } });
    const row = result.comparison!.rows.find((r) => r.term === 'inflow')!;
    expect(row.change).toBe('without');
    expect(row.fTest!.pValue).toBeGreaterThan(0.001);
  });

  it('the profile interval of Cd·a brackets the estimate and is close to the Wald interval for a near-linear problem', () => {
    const { result } = simulateAndFit(scenarios[0][1]);
    const ea = result.effectiveArea;
    expect(ea.profileCi95![0]).toBeLessThan(ea.value);
    expect(ea.profileCi95![1]).toBeGreaterThan(ea.value);
    const halfWald = ea.ci95[1] - ea.value;
    expect(Math.abs(ea.profileCi95![1] - ea.value - halfWald) / halfWald).toBeLessThan(0.05);
  });

  it('a sharp-edged Cd outside the usual band is warned about', () => {
    const sc = scenarios[0][1];
    const { result } = simulateAndFit({ ...sc, boreM: 0.03 }); // wrong bore: Cd ≈ 1.08
    expect(result.warnings.map((w) => w.code)).toContain('cd-outside-usual-band');
  });

  it('bore tolerance adds to the uncertainty of Cd as u_r(Cd)² = u_r(Cd·a)² + (2·u_r(d))² (JCGM 100:2008, 5.1.6)', () => {
    const { result } = simulateAndFit(scenarios[0][1]);
    const cd = result.dischargeCoefficient;
    expect(cd.relativeStandardUncertainty).toBeCloseTo(
      result.effectiveArea.relativeStandardUncertainty,
      12,
    );
  });
});
