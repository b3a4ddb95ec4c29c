import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { budgetInputs } from '../../../server/core/budget/inputs.js';
import { validateVessel } from '../../../server/core/vessel/schema.js';

const base = {
  name: 'v',
  shape: { kind: 'vertical-cylinder', diameterM: 3.2, diameterToleranceM: 0.01 },
  outlet: { boreM: 0.05, elevationM: 0.1 },
  sensor: { zeroElevationM: 0.1 },
};
const ctx = (
  vessel: unknown,
  quantity: 'level' | 'gauge-pressure' | 'absolute-pressure' = 'level',
  densitySource = 'assumed',
) => ({
  vessel: validateVessel(vessel),
  quantity,
  densityKgM3: 998.2,
  densitySource,
  datumFitted: false,
  gravity: 9.80665,
});

describe('stated uncertainties in the vessel file', () => {
  it('reads ± limits as rectangular, u = T/√3 (JCGM 100:2008, 4.3.7), and the resolution as δ/√12', () => {
    const lines = budgetInputs(
      ctx({
        ...base,
        sensor: { zeroElevationM: 0.1, resolutionM: 0.001, spanErrorFraction: 0.002 },
        logger: { clockRateErrorFraction: 2e-5 },
      }),
    );
    const u = (key: string) => lines.find((l) => l.key === key)!.standardUncertainty;
    expect(u('shape.diameterM')).toBeCloseTo(0.01 / Math.sqrt(3), 15);
    expect(u('sensor.resolution')).toBeCloseTo(0.001 / Math.sqrt(12), 15);
    expect(u('sensor.spanError')).toBeCloseTo(0.002 / Math.sqrt(3), 15);
    expect(u('logger.clockRate')).toBeCloseTo(2e-5 / Math.sqrt(3), 18);
  });
  it('an unstated input counts as 0 and says so; a pressure sensor with no temperature assumes 20 ± 10 °C', () => {
    const lines = budgetInputs(ctx(base, 'gauge-pressure'));
    const zero = lines.find((l) => l.key === 'outlet.elevationM')!;
    expect(zero.standardUncertainty).toBe(0);
    expect(zero.note).toMatch(/not stated \(outlet\.elevationToleranceM\): counted as 0/);
    const t = lines.find((l) => l.key === 'fluid.temperature')!;
    expect(t.source).toBe('assumed');
    expect(t.standardUncertainty).toBeCloseTo(10 / Math.sqrt(3), 12);
    // a level sensor: density does not enter, so no line
    expect(budgetInputs(ctx(base)).some((l) => l.key.startsWith('fluid.'))).toBe(false);
  });
  it('a stage–area table needs one tolerance pair per point', () => {
    const table = {
      ...base,
      shape: {
        kind: 'table',
        points: [
          [0, 2],
          [2, 3],
        ],
        pointTolerances: [[0.01, 0.02]],
      },
    };
    expect(() => validateVessel(table, 'pond.vessel.json')).toThrow(InputError);
    try {
      validateVessel(table, 'pond.vessel.json');
    } catch (e) {
      expect((e as InputError).field).toBe('shape.pointTolerances');
    }
    const ok = validateVessel({
      ...table,
      shape: {
        ...table.shape,
        pointTolerances: [
          [0.01, 0.02],
          [0.01, 0.03],
        ],
      },
    });
    expect(budgetInputs(ctx(ok)).filter((l) => l.key.startsWith('shape.points.')).length).toBe(4);
  });
});

describe('a fit whose parameters leave the model', () => {
  it('gives a budget that says the coefficients could not be computed, instead of failing', async () => {
    const { uncertaintyBudget } = await import('../../../server/core/budget/budget.js');
    const { makeShape } = await import('../../../server/core/geometry/index.js');
    const vessel = validateVessel(base);
    const theta = Float64Array.of(0.001, -1, 0.1, 0, 0.5); // initial reading below the outlet: no drain
    const b = uncertaintyBudget({
      ...ctx(base),
      boreM: 0.05,
      model: {
        setting: { shape: makeShape(vessel.shape), outletElevationM: 0.1, gravity: 9.80665 },
        shapeSpec: vessel.shape,
        outletElevationM: 0.1,
        solution: 'closed-form',
        theta,
        free: Int32Array.of(0, 1),
        timeS: Float64Array.of(0, 1, 2),
        levelM: Float64Array.of(1, 0.9, 0.8),
      },
      typeAStandardUncertainty: 1e-6,
      typeADegreesOfFreedom: 10,
      headBands: [],
    });
    const d = b.lines.find((l) => l.key === 'shape.diameterM')!;
    expect(Number.isNaN(d.sensitivityEffectiveArea)).toBe(true);
    expect(d.note).toMatch(/could not be computed/);
    expect(Number.isNaN(b.effectiveAreaM2.combinedStandardUncertainty)).toBe(true);
  });
});
