import { describe, expect, it } from 'vitest';
import { fitSystem } from '../../../server/core/system/fit.js';
import { P, PER_VESSEL, type VesselNetwork } from '../../../server/core/system/network.js';
import { simulateSystemTest } from '../../../server/core/system/simulate.js';
import { alignLogs } from '../../../server/core/system/align.js';
import { rig, THREE_MIXED, truthTheta, TWO_FREE } from './fixtures.js';

function run(net: VesselNetwork, theta: Float64Array, seed: number, durationS: number, lag1 = 0.4) {
  const logs = simulateSystemTest({
    network: net,
    theta,
    durationS,
    sampleIntervalS: net.vessels.map((_, i) => 1 + i),
    sampleOffsetS: net.vessels.map((_, i) => 0.3 * i),
    noiseM: 0.0015,
    noiseLag1: lag1,
    quantumM: 0.001,
    seed,
  });
  const aligned = alignLogs(
    logs.map((l) => ({ ...l, fileName: `v${l.vessel}.csv`, t0EpochMs: 1e12 })),
  );
  return fitSystem({ network: net, logs: aligned.logs });
}

const cases = [
  {
    name: 'two vessels, free jet',
    rig: TWO_FREE,
    cd: [0.61, 0.63],
    surface: [2.0, 0.6],
    durationS: 900,
  },
  {
    name: 'three vessels, submerged then free',
    rig: THREE_MIXED,
    cd: [0.62, 0.6, 0.64],
    surface: [2.2, 0.8, 1.0],
    durationS: 1200,
  },
];

describe('joint fit of connected vessels (simulated tests with known truth, invented rigs)', () => {
  for (const c of cases) {
    it(`${c.name}: every Cd·a within 0.5 % and inside its 95 % interval`, () => {
      const net = rig(c.rig);
      const truth = truthTheta(net, c.cd, c.surface);
      const fit = run(net, truth, 11, c.durationS);
      expect(fit.converged).toBe(true);
      net.vessels.forEach((v, i) => {
        const a = fit.outlets[v.id].effectiveAreaM2;
        const t = truth[i * PER_VESSEL + P.effectiveArea];
        expect(Math.abs(a.value / t - 1)).toBeLessThan(0.005);
        expect(a.ci95[0]).toBeLessThanOrEqual(t);
        expect(a.ci95[1]).toBeGreaterThanOrEqual(t);
        // Cd carries the bore tolerance (GUM combination, fit/coefficient.ts), so its interval is wider
        expect(fit.outlets[v.id].dischargeCoefficient.relativeStandardUncertainty).toBeGreaterThan(
          a.relativeStandardUncertainty,
        );
      });
      // each log's AR(1) factor was measured and applied
      for (const d of fit.vessels) expect(d.varianceInflation).toBeGreaterThan(1.3);
    });
  }

  it('95 % intervals cover the truth on most seeds (AR(1) ρ = 0.6 noise; 12 seeds, two vessels)', () => {
    const net = rig(TWO_FREE);
    const truth = truthTheta(net, [0.61, 0.63], [2.0, 0.6]);
    let covered = 0;
    let total = 0;
    for (let seed = 100; seed < 112; seed++) {
      const fit = run(net, truth, seed, 600, 0.6);
      net.vessels.forEach((v, i) => {
        const a = fit.outlets[v.id].effectiveAreaM2;
        const t = truth[i * PER_VESSEL + P.effectiveArea];
        total++;
        if (a.ci95[0] <= t && t <= a.ci95[1]) covered++;
      });
    }
    expect(total).toBe(24);
    // 24 intervals at 95 %: at least 20 expected to cover (binomial, P(X ≤ 19) ≈ 3 %)
    expect(covered).toBeGreaterThanOrEqual(20);
  });

  it('refuses logs that do not overlap in time', () => {
    const t = Float64Array.from({ length: 10 }, (_, i) => i);
    expect(() =>
      alignLogs([
        { vessel: 0, fileName: 'a.csv', timeS: t, levelM: t, t0EpochMs: 0 },
        { vessel: 1, fileName: 'b.csv', timeS: t, levelM: t, t0EpochMs: 60_000 },
      ]),
    ).toThrow(/does not overlap/);
  });

  it('refuses a system with a vessel left without a log', () => {
    const net = rig(TWO_FREE);
    const t = Float64Array.from({ length: 10 }, (_, i) => i);
    expect(() =>
      fitSystem({ network: net, logs: [{ vessel: 0, fileName: 'a.csv', timeS: t, levelM: t }] }),
    ).toThrow(/no log given for vessel "T2"/);
  });
});
