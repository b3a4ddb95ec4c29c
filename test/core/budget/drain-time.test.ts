import { describe, expect, it } from 'vitest';
import {
  drainTimeS,
  drainTimeWithBudget,
  levelAfterS,
} from '../../../server/core/budget/drain-time.js';
import { InputError } from '../../../server/core/errors.js';

const g = 9.80665; // standard gravity (CGPM 1901)
const ca = 0.001;

describe('single-vessel drain time (exact integral)', () => {
  it('vertical cylinder: 2A(√H0 − √H1)/(Cd·a·√(2g)), to the outlet level too (Torricelli; ordinary calculus)', () => {
    const v = {
      shape: { kind: 'vertical-cylinder' as const, diameterM: 3.2 },
      outletElevationM: 0.1,
      gravity: g,
      effectiveAreaM2: ca,
      exponent: 0.5,
    };
    const A = (Math.PI * 3.2 ** 2) / 4;
    const closed = (h0: number, h1: number) =>
      ((2 * A) / (ca * Math.sqrt(2 * g))) * (Math.sqrt(h0) - Math.sqrt(h1));
    expect(Math.abs(drainTimeS(v, 3, 1) / closed(2.9, 0.9) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(drainTimeS(v, 3, 0.1) / closed(2.9, 0) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(levelAfterS(v, 3, closed(2.9, 0.9)) - 1)).toBeLessThan(1e-9);
    expect(levelAfterS(v, 3, 1e9)).toBe(0.1);
  });
  it('sphere with the outlet at the bottom: ∫π(Dη − η²)/√η dη = π(2D/3·η^{3/2} − 2/5·η^{5/2}) (ordinary calculus)', () => {
    const D = 2.8;
    const v = {
      shape: { kind: 'sphere' as const, diameterM: D },
      outletElevationM: 0,
      gravity: g,
      effectiveAreaM2: ca,
      exponent: 0.5,
    };
    const F = (x: number) => Math.PI * (((2 * D) / 3) * x ** 1.5 - 0.4 * x ** 2.5);
    const exact = (F(2.5) - F(0)) / (ca * Math.sqrt(2 * g));
    expect(Math.abs(drainTimeS(v, 2.5, 0) / exact - 1)).toBeLessThan(1e-9);
  });
  it('a level below the outlet is refused with a clear message', () => {
    const v = {
      shape: { kind: 'vertical-cylinder' as const, diameterM: 2 },
      outletElevationM: 0.2,
      gravity: g,
      effectiveAreaM2: ca,
      exponent: 0.5,
    };
    expect(() => drainTimeS(v, 2, 0.1)).toThrow(InputError);
    expect(() => drainTimeS(v, 2, 0.1)).toThrow(/below the outlet \(centreline at 0\.2 m/);
  });
  it('the diameter error carried by the fitted Cd·a cancels in a drain time of the same vessel', () => {
    const D = 3.2;
    const v = {
      shape: { kind: 'vertical-cylinder' as const, diameterM: D },
      outletElevationM: 0.1,
      gravity: g,
      effectiveAreaM2: ca,
      exponent: 0.5,
    };
    // Cd·a ∝ D² (∂(Cd·a)/∂D = 2·Cd·a/D) and t ∝ D²/Cd·a: the two effects cancel exactly
    const lines = [
      {
        key: 'shape.diameterM',
        standardUncertainty: 0.01 / Math.sqrt(3),
        sensitivityEffectiveArea: (2 * ca) / D,
        degreesOfFreedom: null,
        counted: true,
      },
    ];
    expect(drainTimeWithBudget(v, lines, 3, 1).standardUncertainty).toBeLessThan(
      1e-6 * drainTimeS(v, 3, 1),
    );
    // type A alone: u(t)/t = u(Cd·a)/Cd·a
    const typeA = [
      {
        key: 'fit',
        standardUncertainty: 0.003 * ca,
        sensitivityEffectiveArea: 1,
        degreesOfFreedom: 40,
        counted: true,
      },
    ];
    const p = drainTimeWithBudget(v, typeA, 3, 1);
    expect(p.standardUncertainty / p.value).toBeCloseTo(0.003, 6);
    expect(p.effectiveDegreesOfFreedom).toBeCloseTo(40, 6);
  });
});
