/**
 * Tests side by side (server/core/compare/side-by-side.ts) against Torricelli's closed form for a
 * vertical cylinder: A·dh/dt = −Cd·a·√(2 g h), so √h(t) = √h₀ − k·t with k = Cd·a·√(2g) / (2A),
 * and the time to fall from head H to head h is (√H − √h) / k (any fluid-mechanics text; derived
 * here). The E_n arithmetic itself is checked in en.test.ts.
 */
import { describe, expect, it } from 'vitest';
import {
  headOffsetOf,
  sideBySide,
  timeAtHead,
  type SideBySideFit,
} from '../../../server/core/compare/side-by-side.js';

const G = 9.80665; // standard gravity, m/s² (NIST SP 811 B.8)
const AREA_M2 = Math.PI * 1.5 ** 2; // a 3 m vertical cylinder (invented)

/** A fit result whose stored window plot follows the closed form from head h0 (sensor zero and outlet as given). */
function drain(
  testId: number,
  cda: number,
  U: number,
  h0: number,
  opts: { sensorZeroM?: number; outletM?: number; offsetS?: number } = {},
): SideBySideFit {
  const zero = opts.sensorZeroM ?? 0.25;
  const outlet = opts.outletM ?? 0.1;
  const k = (cda * Math.sqrt(2 * G)) / (2 * AREA_M2);
  const timeS = Array.from({ length: 200 }, (_, i) => i * 10);
  const headM = timeS.map((t) => (Math.sqrt(h0) - k * t) ** 2);
  const reading = headM.map((h) => h - (zero - outlet)); // what the sensor reads
  return {
    testId,
    fitId: testId * 10,
    fitStatus: 'approved',
    testedAt: `2026-0${testId}-01T08:00:00Z`,
    result: {
      converged: true,
      effectiveAreaM2: { value: cda, expandedUncertainty: U },
      dischargeCoefficient: { value: cda / 0.00196, expandedUncertainty: U / 0.00196 },
      parameters: [{ name: 'sensorZeroElevationM', value: zero }],
      outlet: { elevationM: outlet },
      plot: {
        window: {
          offsetS: opts.offsetS ?? 0,
          timeS,
          observedM: reading.map((r, i) => r + (i % 2 ? 0.001 : -0.001)), // ±1 mm of scatter
          fittedM: reading,
        },
      },
    },
  };
}

describe('tests side by side', () => {
  it('gives head above the outlet from the sensor zero and the outlet height', () => {
    const f = drain(1, 1.2e-3, 1e-6, 3);
    expect(headOffsetOf(f.result)).toBeCloseTo(0.15, 12);
    expect(headOffsetOf({ parameters: [] })).toBeNull();
  });

  it('times every curve from the highest head all reach, matching the closed form', () => {
    const cda = 1.2e-3;
    const k = (cda * Math.sqrt(2 * G)) / (2 * AREA_M2);
    // the same outlet from two start heads, on clocks that start differently
    const a = drain(1, cda, 2e-6, 3.4);
    const b = drain(2, cda, 2e-6, 2.9, { offsetS: 500, sensorZeroM: 0.1 });
    const s = sideBySide([a, b]);
    expect(s.referenceHeadM).toBeCloseTo(2.9, 9); // b's top
    for (const t of s.tests) {
      const c = t.curve!;
      // at a head well below the reference, the elapsed time is (√H − √h)/k for both tests
      const i = c.fittedHeadM.findIndex((h) => h < 2.0);
      const expected = (Math.sqrt(2.9) - Math.sqrt(c.fittedHeadM[i])) / k;
      // within 0.01 s: the passing of the reference head is interpolated linearly between points 10 s apart
      expect(Math.abs(c.elapsedS[i] - expected)).toBeLessThan(0.01);
      // readings carry the head offset too
      expect(Math.abs(c.headM[i] - c.fittedHeadM[i])).toBeCloseTo(0.001, 9);
    }
    // the curve of the same Cd·a lies on one line: equal elapsed time at (nearly) equal head
    const [ca, cb] = s.tests.map((t) => t.curve!);
    const tA = timeAtHead(ca.elapsedS, ca.fittedHeadM, 1.5)!;
    const tB = timeAtHead(cb.elapsedS, cb.fittedHeadM, 1.5)!;
    expect(Math.abs(tA - tB)).toBeLessThan(0.5); // linear interpolation over 10 s steps
    expect(tA).toBeCloseTo((Math.sqrt(2.9) - Math.sqrt(1.5)) / k, 0);
  });

  it('compares each pair with E_n from Cd·a and its U (3-4-5 case)', () => {
    const s = sideBySide([drain(1, 1.0e-3, 3e-6, 3), drain(2, 1.006e-3, 4e-6, 3)]);
    expect(s.pairs).toHaveLength(1);
    const p = s.pairs[0].effectiveArea!;
    // by hand: U_diff = √(3² + 4²)·10⁻⁶ = 5·10⁻⁶; E_n = −6·10⁻⁶ / 5·10⁻⁶ = −1.2 → differs
    expect(p.expandedUncertaintyOfDifference).toBeCloseTo(5e-6, 15);
    expect(p.en).toBeCloseTo(-1.2, 9);
    expect(p.agree).toBe(false);
    expect(s.pairs[0].first).toBe('test 1 (2026-01-01)');
  });

  it('says so when the tests share no head, and when a fit keeps no readings', () => {
    const high = drain(1, 1.2e-3, 2e-6, 3.5);
    high.result.plot = {
      window: {
        offsetS: 0,
        timeS: [0, 10, 20],
        observedM: [3.2, 3.1, 3.0],
        fittedM: [3.2, 3.1, 3.0],
      },
    };
    const low = drain(2, 1.2e-3, 2e-6, 1.0);
    const bare = { ...drain(3, 1.2e-3, 2e-6, 1.0), result: { converged: true } };
    const s = sideBySide([high, low, bare]);
    expect(s.referenceHeadM).toBeNull();
    expect(s.tests[0].curve!.elapsedS[0]).toBe(0);
    expect(s.tests[2].curve).toBeNull();
    expect(s.notes.join(' ')).toMatch(/do not overlap/);
    expect(s.notes.join(' ')).toMatch(/test 3 .*no readings/);
    expect(s.pairs).toHaveLength(3);
    expect(s.pairs[1].effectiveArea).toBeNull(); // test 3 has no Cd·a
  });
});
