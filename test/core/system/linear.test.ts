import { describe, expect, it } from 'vitest';
import { integrateSystem } from '../../../server/core/system/integrate.js';
import { linearize, linearStepResponse } from '../../../server/core/system/linear.js';
import { linearModelCsv, linearModelText } from '../../../server/core/system/linear-export.js';
import type { SystemModel } from '../../../server/core/system/model.js';
import { P, PER_VESSEL } from '../../../server/core/system/network.js';
import { netFlows, rateWork } from '../../../server/core/system/rates.js';
import { rig, THREE_MIXED, truthTheta, TWO_FREE } from './fixtures.js';

const g = 9.80665; // standard gravity (CGPM 1901)

function model(vessels: typeof TWO_FREE, cd: number[]): SystemModel {
  const network = rig(vessels);
  const theta = truthTheta(
    network,
    cd,
    vessels.map(() => 1),
  );
  const free = Int32Array.from(network.vessels.map((_, i) => i * PER_VESSEL + P.effectiveArea));
  const k = free.length;
  const covariance = new Float64Array(k * k);
  for (let a = 0; a < k; a++) covariance[a * k + a] = (0.003 * theta[free[a]]) ** 2;
  return { network, theta, free, covariance, degreesOfFreedom: 400 };
}

describe('linear model about an operating point', () => {
  it('one free vessel: A = −1/τ with τ = 2·A·sqrt(H0)/(Cd·a·sqrt(2g)) (field notes, linearised Torricelli)', () => {
    const m = model([TWO_FREE[1]], [0.63]);
    const lm = linearize(m, Float64Array.of(0.0012));
    const v = m.network.vessels[0];
    const h0 = lm.operatingLevelsM[0] - v.outletElevationM;
    const area = v.shape.areaM2(lm.operatingLevelsM[0]);
    const tau = (2 * area * Math.sqrt(h0)) / (m.theta[0] * Math.sqrt(2 * g));
    expect(lm.timeConstantsS[0].value).toBeCloseTo(tau, 8);
    expect(lm.a[0].value).toBeCloseTo(-1 / tau, 12);
    expect(lm.b[0].value).toBeCloseTo(1 / area, 12);
    // τ ∝ 1/(Cd·a) at fixed Q... with H0 ∝ 1/(Cd·a)², τ ∝ (Cd·a)⁻²: u_r(τ) = 2·u_r(Cd·a)
    expect(lm.timeConstantsS[0].standardUncertainty! / tau).toBeCloseTo(2 * 0.003, 5);
  });

  it('A agrees with central differences of the nonlinear rates at the equilibrium', () => {
    const m = model(THREE_MIXED, [0.62, 0.6, 0.64]);
    const q = Float64Array.of(0.0015, 0.0002, 0);
    const lm = linearize(m, q);
    const n = 3;
    const w = rateWork(n);
    const inflows = Array.from(q, (x, i) => ({ vessel: i, constantM3S: x }));
    const f = (eta: Float64Array) => {
      const net = new Float64Array(n);
      netFlows(m.network, m.theta, inflows, 0, eta, net, null, w);
      return net.map((x, i) => x / m.network.vessels[i].shape.areaM2(eta[i]));
    };
    for (let j = 0; j < n; j++) {
      const h = 1e-6;
      const up = Float64Array.from(lm.operatingLevelsM);
      const dn = Float64Array.from(lm.operatingLevelsM);
      up[j] += h;
      dn[j] -= h;
      const fu = f(up);
      const fd = f(dn);
      for (let i = 0; i < n; i++)
        expect(Math.abs(lm.a[i * n + j].value - (fu[i] - fd[i]) / (2 * h))).toBeLessThan(1e-8);
    }
  });

  it('a small inflow step of the nonlinear simulation follows the linear model (error shrinks with the step)', () => {
    const m = model(THREE_MIXED, [0.62, 0.6, 0.64]);
    const q = Float64Array.of(0.0015, 0, 0);
    const lm = linearize(m, q);
    const n = 3;
    const a = Float64Array.from(lm.a, (e) => e.value);
    const b = Float64Array.from(lm.b, (e) => e.value);
    const relErr = (dq: number) => {
      const theta = Float64Array.from(m.theta);
      for (let i = 0; i < n; i++)
        theta[i * PER_VESSEL + P.initialReading] =
          lm.operatingLevelsM[i] - theta[i * PER_VESSEL + P.sensorZero];
      const t = 200;
      const eta = new Float64Array(n);
      integrateSystem(m.network, theta, Float64Array.of(t), eta, null, {
        inflows: [{ vessel: 0, constantM3S: q[0] + dq }],
        free: new Int32Array(0),
      });
      const x = linearStepResponse(a, b, Float64Array.of(dq, 0, 0), n, t, 4000);
      let worst = 0;
      for (let i = 0; i < n; i++)
        worst = Math.max(worst, Math.abs(eta[i] - lm.operatingLevelsM[i] - x[i]) / Math.abs(x[i]));
      return worst;
    };
    const e1 = relErr(0.0015 * 0.02);
    const e2 = relErr(0.0015 * 0.01);
    expect(e1).toBeLessThan(0.02);
    // the mismatch is second order: halving the step about halves the relative error
    expect(e2 / e1).toBeGreaterThan(0.4);
    expect(e2 / e1).toBeLessThan(0.6);
  });

  it('exports as CSV rows and as labelled text tables (no matrix-literal syntax)', () => {
    const lm = linearize(model(TWO_FREE, [0.61, 0.8]), Float64Array.of(0.001, 0));
    const csv = linearModelCsv(lm).trim().split('\n');
    expect(csv[0]).toBe('matrix,row,column,value,standard_uncertainty,ci95_low,ci95_high');
    expect(csv.filter((r) => r.startsWith('A,')).length).toBe(4);
    expect(Number(csv.find((r) => r.startsWith('A,T2,T1,'))!.split(',')[3])).toBeCloseTo(
      lm.a[2].value,
      8,
    );
    const text = linearModelText(lm);
    // our own layout: no matrix literal of any numerical language (issue 17)
    expect(text).not.toMatch(/\[[^\]]*;[^\]]*\]/s);
    expect(text).not.toMatch(/eye\(/);
    expect(text).not.toContain('[');
    // a labelled table: a header naming each column vessel with its unit, one row per vessel
    const lines = text.split('\n');
    const aHead = lines.findIndex((l) => l.includes('per m in T1, 1/s'));
    expect(lines[aHead]).toContain('per m in T2, 1/s');
    const row = lines[aHead + 3].trim().split(/\s{3,}/);
    expect(row[0]).toBe('T2');
    // six significant figures printed
    expect(Number(row[1]) / lm.a[2].value).toBeCloseTo(1, 5);
    expect(text).toContain('per m³/s into T1, 1/m²');
    expect(text).toMatch(/Time constants, s/);
  });
});
