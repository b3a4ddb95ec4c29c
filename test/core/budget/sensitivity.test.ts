import { describe, expect, it } from 'vitest';
import { makeShape, type ShapeSpec } from '../../../server/core/geometry/index.js';
import { simulateDrainTest } from '../../../server/core/drain/simulate.js';
import { fitDrain } from '../../../server/core/fit/fit-drain.js';
import { waterDensityKgM3 } from '../../../server/core/units/density.js';
import { withFieldChanged } from '../../../server/core/budget/inputs.js';
import type { BudgetLine } from '../../../server/core/budget/budget.js';
import type { VesselSpec } from '../../../server/core/vessel/schema.js';
import { g, settingFor } from '../fit/simulated.js';
import { budgetOf } from './budget-helpers.js';

/**
 * Every budget line's sensitivity coefficient: against a value derived by hand for a vertical
 * cylinder (closed form), and against central differences of whole refits for the ODE shapes.
 */
function fitOf(
  vessel: VesselSpec,
  cdA: number,
  noiseM: number,
  seed = 7,
  startM = 2.4,
  drainS = 1500,
  dtS = 2,
) {
  const zs = vessel.sensor?.zeroElevationM ?? 0;
  const setting = settingFor(vessel.shape, vessel.outlet.elevationM);
  const log = simulateDrainTest({
    setting,
    effectiveAreaM2: cdA,
    initialSurfaceM: startM,
    sensorZeroElevationM: zs,
    sampleIntervalS: dtS,
    drainS,
    noiseM,
    seed,
  });
  const data = { timeS: log.timeS, levelM: log.levelM };
  const refit = (v: VesselSpec, d: { timeS: Float64Array; levelM: Float64Array }, zero = zs) =>
    fitDrain({
      setting: settingFor(v.shape, v.outlet.elevationM),
      ...d,
      knownSensorZeroM: zero,
      terms: { inflow: false, datum: false, exponent: false },
      outlet: { boreM: v.outlet.boreM },
      essentialsOnly: true,
    });
  return { fit: refit(vessel, data), data, refit };
}

const byKey = (lines: BudgetLine[], key: string) => {
  const l = lines.find((x) => x.key === key);
  if (!l) throw new Error(`no budget line ${key}`);
  return l;
};

describe('hand-derived coefficients, vertical cylinder (closed form, sensor zero at the outlet)', () => {
  const D = 3.2;
  const bore = 0.05;
  const vessel = {
    name: 'c',
    shape: { kind: 'vertical-cylinder', diameterM: D },
    outlet: { boreM: bore, elevationM: 0.1 },
    sensor: { zeroElevationM: 0.1 },
  } as VesselSpec;
  const cdA0 = (0.61 * Math.PI * bore * bore) / 4;
  const { fit, data } = fitOf(vessel, cdA0, 1e-4);
  const cdA = fit.variant.theta[0];
  const y0 = fit.variant.theta[1];
  const A = (Math.PI * D * D) / 4;
  const lines = budgetOf(vessel, fit, data).lines;
  const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

  // y = (√H0 − k·t)² + (z_o − z_s), H0 = y0 − (z_o − z_s), k = Cd·a·√(2g)/(2A): by hand,
  // ∂y/∂Cd·a = −s·t·√(2g)/A, ∂y/∂y0 = s/√H0 (s = √H0 − k·t), and a shift of every reading by δ
  // moves θ̂ by (JᵀJ)⁻¹Jᵀ·1 (least squares on y + δ).
  const m = data.timeS.length;
  const H0 = y0;
  const k = (cdA * Math.sqrt(2 * g)) / (2 * A);
  let a11 = 0,
    a12 = 0,
    a22 = 0,
    b1 = 0,
    b2 = 0;
  for (let i = 0; i < m; i++) {
    const t = data.timeS[i];
    const s = Math.max(Math.sqrt(H0) - k * t, 0);
    const j1 = (-s * t * Math.sqrt(2 * g)) / A;
    const j2 = s / Math.sqrt(H0);
    a11 += j1 * j1;
    a12 += j1 * j2;
    a22 += j2 * j2;
    b1 += j1;
    b2 += j2;
  }
  const det = a11 * a22 - a12 * a12;
  const offsetCoefficient = (a22 * b1 - a12 * b2) / det; // [(JᵀJ)⁻¹Jᵀ1] for Cd·a
  const perReading = Math.sqrt(a22 / det); // √[(JᵀJ)⁻¹]_aa

  it('diameter: ∂(Cd·a)/∂D = 2·Cd·a/D (Cd·a ∝ A = πD²/4)', () =>
    expect(
      rel(byKey(lines, 'shape.diameterM').sensitivityEffectiveArea, (2 * cdA) / D),
    ).toBeLessThan(1e-4));
  it('span error ε (reading = (1+ε)·true): −Cd·a/2 (heads scale, Cd·a ∝ √(head scale))', () =>
    expect(rel(byKey(lines, 'sensor.spanError').sensitivityEffectiveArea, -cdA / 2)).toBeLessThan(
      1e-4,
    ));
  it('clock rate error ε: −Cd·a (Cd·a ∝ 1/time scale)', () =>
    expect(rel(byKey(lines, 'logger.clockRate').sensitivityEffectiveArea, -cdA)).toBeLessThan(
      1e-4,
    ));
  it('outlet elevation: −(JᵀJ)⁻¹Jᵀ1; sensor zero: +(JᵀJ)⁻¹Jᵀ1', () => {
    expect(
      rel(byKey(lines, 'outlet.elevationM').sensitivityEffectiveArea, -offsetCoefficient),
    ).toBeLessThan(1e-3);
    expect(
      rel(byKey(lines, 'sensor.zeroElevationM').sensitivityEffectiveArea, offsetCoefficient),
    ).toBeLessThan(1e-3);
  });
  it('resolution (independent per reading): √[(JᵀJ)⁻¹]_aa, shown but not added (inside type A)', () => {
    const l = byKey(lines, 'sensor.resolution');
    expect(rel(l.sensitivityEffectiveArea, perReading)).toBeLessThan(1e-3);
    expect(l.counted).toBe(false);
  });
  it('bore: ∂Cd/∂d = −2·Cd/d (Cd = Cd·a/(πd²/4)); no effect on Cd·a', () => {
    const l = byKey(lines, 'outlet.boreM');
    const cd = cdA / ((Math.PI * bore * bore) / 4);
    expect(rel(l.sensitivity, (-2 * cd) / bore)).toBeLessThan(1e-9);
    expect(l.sensitivityEffectiveArea).toBe(0);
  });
  it('pressure sensor: density ∂(Cd·a)/∂ρ = −Cd·a/(2ρ) (h = p/(ρg)); temperature through dρ/dT; barometer offset (1/(ρg))·(JᵀJ)⁻¹Jᵀ1', () => {
    const rho = 999.5;
    const gauge = budgetOf(
      { ...vessel, fluid: { densityKgM3: rho, densityToleranceKgM3: 0.5 } } as VesselSpec,
      fit,
      data,
      { quantity: 'absolute-pressure', densityKgM3: rho },
    ).lines;
    expect(
      rel(byKey(gauge, 'fluid.density').sensitivityEffectiveArea, -cdA / (2 * rho)),
    ).toBeLessThan(1e-4);
    expect(
      rel(byKey(gauge, 'sensor.barometer').sensitivityEffectiveArea, offsetCoefficient / (rho * g)),
    ).toBeLessThan(1e-3);
    const T = 12;
    const rhoT = waterDensityKgM3(T);
    const byT = budgetOf(
      { ...vessel, fluid: { temperatureC: T, temperatureToleranceC: 2 } } as VesselSpec,
      fit,
      data,
      { quantity: 'gauge-pressure', densityKgM3: rhoT, densitySource: 'from the vessel file' },
    ).lines;
    const dRhoDt = (waterDensityKgM3(T + 0.5) - waterDensityKgM3(T - 0.5)) / 1;
    expect(
      rel(byKey(byT, 'fluid.temperature').sensitivityEffectiveArea, (-cdA / (2 * rhoT)) * dRhoDt),
    ).toBeLessThan(1e-3);
  });
  it('a top-mounted gauge: the mount elevation shifts every reading, (JᵀJ)⁻¹Jᵀ1', () => {
    const top = budgetOf(
      { ...vessel, sensor: { mountElevationM: 4, mountElevationToleranceM: 0.005 } } as VesselSpec,
      fit,
      data,
      { quantity: 'distance-from-top' },
    ).lines;
    expect(
      rel(byKey(top, 'sensor.mountElevationM').sensitivityEffectiveArea, offsetCoefficient),
    ).toBeLessThan(1e-3);
  });

  it('rectangular: ∂(Cd·a)/∂L = Cd·a/L, ∂(Cd·a)/∂W = Cd·a/W', () => {
    const L = 2.5,
      W = 3.2165;
    const rect = { ...vessel, shape: { kind: 'rectangular', lengthM: L, widthM: W } } as VesselSpec;
    const r = fitOf(rect, cdA0, 1e-4);
    const c = r.fit.variant.theta[0];
    const ls = budgetOf(rect, r.fit, r.data).lines;
    expect(rel(byKey(ls, 'shape.lengthM').sensitivityEffectiveArea, c / L)).toBeLessThan(1e-4);
    expect(rel(byKey(ls, 'shape.widthM').sensitivityEffectiveArea, c / W)).toBeLessThan(1e-4);
  });

  it('stage–area table of constant area: Σ A_i·∂(Cd·a)/∂A_i = Cd·a (area scaled), Σ ∂(Cd·a)/∂h_i = 0 (table moved up)', () => {
    const tab = {
      ...vessel,
      shape: {
        kind: 'table',
        points: [
          [0, A],
          [1.5, A],
          [4, A],
        ],
        pointTolerances: [
          [0.01, 0.05],
          [0.01, 0.05],
          [0.01, 0.05],
        ],
      },
    } as VesselSpec;
    const r = fitOf(tab, cdA0, 1e-4);
    const c = r.fit.variant.theta[0];
    const ls = budgetOf(tab, r.fit, r.data).lines;
    let areaSum = 0,
      heightSum = 0;
    for (let i = 0; i < 3; i++) {
      areaSum += A * byKey(ls, `shape.points.${i}.1`).sensitivityEffectiveArea;
      heightSum += byKey(ls, `shape.points.${i}.0`).sensitivityEffectiveArea;
    }
    expect(rel(areaSum, c)).toBeLessThan(1e-3);
    expect(Math.abs(heightSum)).toBeLessThan(1e-6 * c);
  });

  it('Done when: ±10 mm on a 3.2 m diameter gives u_r(Cd·a) ≥ 2·(10/√3)/3200, the diameter the largest line', () => {
    const tol = {
      ...vessel,
      shape: { kind: 'vertical-cylinder', diameterM: D, diameterToleranceM: 0.01 },
      sensor: { zeroElevationM: 0.1, zeroElevationToleranceM: 0.001, spanErrorFraction: 0.001 },
      logger: { clockRateErrorFraction: 5e-5 },
    } as VesselSpec;
    const b = budgetOf(tol, fit, data);
    expect(b.effectiveAreaM2.relativeStandardUncertainty).toBeGreaterThanOrEqual(
      (2 * (10 / Math.sqrt(3))) / 3200,
    );
    const largest = b.lines
      .filter((l) => l.counted && l.key !== 'outlet.boreM')
      .sort((x, y) => y.contributionEffectiveArea - x.contributionEffectiveArea)[0];
    expect(largest.key).toBe('shape.diameterM');
    // shares of the counted lines add to 1
    expect(b.lines.reduce((s, l) => s + l.share, 0)).toBeCloseTo(1, 12);
  });
});

describe('ODE shapes: the linear response against central differences of whole refits', () => {
  const bore = 0.04;
  const cdA0 = (0.62 * Math.PI * bore * bore) / 4;
  const shapes: ShapeSpec[] = [
    { kind: 'horizontal-cylinder', diameterM: 2.6, lengthM: 4 },
    { kind: 'sphere', diameterM: 2.8 },
    { kind: 'cone-bottom', diameterM: 2.2, coneHeightM: 1.2 },
    { kind: 'elliptical-head-cylinder', diameterM: 2.0 },
    {
      kind: 'table',
      points: [
        [0, 1.2],
        [0.8, 2.5],
        [1.6, 3.1],
        [3, 3.4],
      ],
    },
  ];
  for (const shape of shapes) {
    it(`${shape.kind}: every line within 2 % (or 1e-3 of Cd·a per unit) of the refit derivative`, () => {
      const vessel = {
        name: 's',
        shape,
        outlet: { boreM: bore, elevationM: 0.05 },
        sensor: { zeroElevationM: 0.02 },
      } as VesselSpec;
      const top = Math.min(makeShape(shape).heightM, 2.4) - 0.1;
      const { fit, data, refit } = fitOf(vessel, cdA0, 5e-4, 11, top, 1200, 2);
      const c = fit.variant.theta[0];
      const lines = budgetOf(vessel, fit, data).lines;
      const central = (plus: number, minus: number, h: number) => (plus - minus) / (2 * h);
      const check = (key: string, derivative: number) => {
        const got = byKey(lines, key).sensitivityEffectiveArea;
        expect(Math.abs(got - derivative), `${key}: ${got} vs ${derivative}`).toBeLessThan(
          Math.max(0.02 * Math.abs(derivative), 1e-3 * c),
        );
      };
      for (const l of lines.filter(
        (x) => x.key.startsWith('shape.') || x.key === 'outlet.elevationM',
      )) {
        const h = l.key === 'outlet.elevationM' || l.key.endsWith('.0') ? 1e-3 : 1e-3 * l.value;
        const moved = (d: number) =>
          l.key === 'outlet.elevationM'
            ? { ...vessel, outlet: { ...vessel.outlet, elevationM: vessel.outlet.elevationM + d } }
            : withFieldChanged(vessel, l.key, d);
        // a point at height 0 cannot move down: forward difference
        if (l.key.endsWith('.0') && l.value < h)
          check(l.key, (refit(moved(h), data).variant.theta[0] - c) / h);
        else
          check(
            l.key,
            central(
              refit(moved(h), data).variant.theta[0],
              refit(moved(-h), data).variant.theta[0],
              h,
            ),
          );
      }
      const h = 1e-3;
      check(
        'sensor.zeroElevationM',
        central(
          refit(vessel, data, 0.02 + h).variant.theta[0],
          refit(vessel, data, 0.02 - h).variant.theta[0],
          h,
        ),
      );
      const scaled = (e: number) => ({
        timeS: data.timeS,
        levelM: data.levelM.map((y) => y / (1 + e)),
      });
      check(
        'sensor.spanError',
        central(
          refit(vessel, scaled(h)).variant.theta[0],
          refit(vessel, scaled(-h)).variant.theta[0],
          h,
        ),
      );
      const clock = (e: number) => ({
        timeS: data.timeS.map((t) => t * (1 + e)),
        levelM: data.levelM,
      });
      check(
        'logger.clockRate',
        central(
          refit(vessel, clock(h)).variant.theta[0],
          refit(vessel, clock(-h)).variant.theta[0],
          h,
        ),
      );
      const shifted = (e: number) => ({ timeS: data.timeS, levelM: data.levelM.map((y) => y + e) });
      // a pressure sensor: density (h = p/(ρg), readings × ρ0/ρ) and the barometer's offset (+δ/(ρg))
      const rho = 998.2;
      const pressure = budgetOf(
        { ...vessel, fluid: { densityKgM3: rho } } as VesselSpec,
        fit,
        data,
        { quantity: 'absolute-pressure', densityKgM3: rho },
      ).lines;
      const hRho = 1;
      const dens = central(
        refit(vessel, scaled(hRho / rho)).variant.theta[0],
        refit(vessel, scaled(-hRho / rho)).variant.theta[0],
        hRho,
      );
      expect(
        Math.abs(byKey(pressure, 'fluid.density').sensitivityEffectiveArea - dens),
      ).toBeLessThan(Math.max(0.02 * Math.abs(dens), 1e-6 * c));
      const hPa = 100;
      const baro = central(
        refit(vessel, shifted(hPa / (rho * g))).variant.theta[0],
        refit(vessel, shifted(-hPa / (rho * g))).variant.theta[0],
        hPa,
      );
      expect(
        Math.abs(byKey(pressure, 'sensor.barometer').sensitivityEffectiveArea - baro),
      ).toBeLessThan(Math.max(0.02 * Math.abs(baro), 1e-7 * c));
      const top2 = budgetOf(
        { ...vessel, sensor: { mountElevationM: 3.5 } } as VesselSpec,
        fit,
        data,
        { quantity: 'distance-from-top' },
      ).lines;
      const mount = byKey(top2, 'sensor.mountElevationM').sensitivityEffectiveArea;
      const mountRefit = central(
        refit(vessel, shifted(h)).variant.theta[0],
        refit(vessel, shifted(-h)).variant.theta[0],
        h,
      );
      expect(Math.abs(mount - mountRefit)).toBeLessThan(
        Math.max(0.02 * Math.abs(mountRefit), 1e-3 * c),
      );
    }, 60_000);
  }
});
