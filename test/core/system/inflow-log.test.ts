import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { alignLogs } from '../../../server/core/system/align.js';
import { fitSystem } from '../../../server/core/system/fit.js';
import { readFlowLog, type FlowSeries } from '../../../server/core/system/flow-log.js';
import { inflowOnFitClock, meanFlowOverSpan } from '../../../server/core/system/inflow-log.js';
import { integrateSystem } from '../../../server/core/system/integrate.js';
import { P, PER_VESSEL, type InflowInput } from '../../../server/core/system/network.js';
import { simulateSystemTest } from '../../../server/core/system/simulate.js';
import { validateSystem } from '../../../server/core/system/schema.js';
import { rig, rigSpec, truthTheta, TWO_FREE } from './fixtures.js';

/** The two-vessel rig as raw system-file vessels (re-serialised from the validated spec). */
const rigSpecBody = () => JSON.parse(JSON.stringify(rigSpec(TWO_FREE).vessels));

const enc = (s: string) => new TextEncoder().encode(s);
const G = 9.80665; // standard gravity (CGPM 1901), as the model uses

/** An invented pump that cycles: on for 100 s at 1.5 L/s, off for 140 s, 6 s ramps, starting mid-cycle. */
function pump(t: number): number {
  const u = (t + 37) % 240;
  const on = 0.0015;
  if (u < 6) return (on * u) / 6;
  if (u < 106) return on;
  if (u < 112) return (on * (112 - u)) / 6;
  return 0;
}
/** The pump's true schedule, exact at 0.5 s resolution (its corners fall between the meter's readings). */
function pumpTruth(vessel: number, durationS: number): InflowInput {
  const timeS = Float64Array.from({ length: Math.ceil(durationS / 0.5) + 1 }, (_, i) => i * 0.5);
  return { vessel, timeS, flowM3S: Float64Array.from(timeS, pump) };
}

describe("readFlowLog: a flow meter's log through ingest's conventions", () => {
  it('reads a preamble, semicolons, decimal commas, day-first dates and L/min from the header', () => {
    const text =
      'Meter: invented\nSite: test\n\nDatum;Zeit;Zufluss [L/min]\n07.04.2026;09:00:00;30,0\n07.04.2026;09:00:02;60,0\n07.04.2026;09:00:04;90,0\n13.04.2026;09:00:06;90,0\n';
    const s = readFlowLog(enc(text), 'meter.csv');
    expect(s.unit).toBe('L/min');
    expect(Array.from(s.timeS.subarray(0, 3))).toEqual([0, 2, 4]);
    // 30 L/min = 0.5 L/s = 5e-4 m³/s (1 L = 1e-3 m³ exactly, SI)
    expect(s.flowM3S[0]).toBeCloseTo(5e-4, 15);
    expect(s.flowM3S[2]).toBeCloseTo(1.5e-3, 15);
    expect(s.t0EpochMs).toBe(Date.UTC(2026, 3, 7, 9, 0, 0));
  });

  it("reads elapsed seconds with a flow unit given apart, and a unit as the header's last word", () => {
    const a = readFlowLog(enc('elapsed [s],flow\n0,1.5\n10,2.5\n'), 'a.csv', { unit: 'L/s' });
    expect(a.t0EpochMs).toBeNull();
    expect(Array.from(a.flowM3S)).toEqual([0.0015, 0.0025]);
    const b = readFlowLog(enc('time [s],inflow m3/h\n0,3.6\n5,7.2\n'), 'b.csv');
    expect(b.flowM3S[0]).toBeCloseTo(1e-3, 15);
  });

  it.each([
    ['time [s],flow\n0,1\n1,2\n', {}, /gives no flow unit/],
    ['time [s],flow [L/s]\n0,1\n1,-2\n', {}, /cannot be negative/],
    ['time [s],level [m]\n0,1\n1,2\n', {}, /found no flow column/],
    ['time [s],flow\n0,1\n1,2\n', { unit: 'furlongs' }, /not a flow unit/],
  ])('refuses %j', (text, opts, msg) => {
    expect(() => readFlowLog(enc(text), 'x.csv', opts)).toThrow(InputError);
    expect(() => readFlowLog(enc(text), 'x.csv', opts)).toThrow(msg);
  });
});

describe('a logged inflow inside the ODE (piecewise linear in time)', () => {
  const one = rig([{ ...TWO_FREE[0], to: null }]);
  const area = (Math.PI * 1.2 ** 2) / 4;

  it('a log of constant flow at irregular times gives the constant-inflow solution', () => {
    const th = truthTheta(one, [0.61], [1.8]);
    const t = Float64Array.from({ length: 61 }, (_, i) => i * 10);
    const logTimes = Float64Array.from([0, 3.3, 17, 17.5, 90, 211, 400.2, 600]);
    const a = new Float64Array(61);
    const b = new Float64Array(61);
    integrateSystem(one, th, t, a, null, {
      inflows: [{ vessel: 0, constantM3S: 0.001 }],
      free: new Int32Array(0),
    });
    integrateSystem(one, th, t, b, null, {
      inflows: [
        { vessel: 0, timeS: logTimes, flowM3S: new Float64Array(logTimes.length).fill(0.001) },
      ],
      free: new Int32Array(0),
    });
    // 1 µm: a thousandth of the logs' 1 mm quantisation; only the step grids differ
    for (let i = 0; i < 61; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-6);
  });

  it('with the outlet shut, the level is the exact integral of the piecewise-linear inflow (closed form)', () => {
    const th = truthTheta(one, [0], [0.5]);
    const meter: InflowInput = {
      vessel: 0,
      timeS: Float64Array.from({ length: 301 }, (_, i) => i * 2),
      flowM3S: new Float64Array(301),
    };
    meter.flowM3S!.set(Array.from(meter.timeS!, pump));
    const t = Float64Array.from({ length: 41 }, (_, i) => i * 15 + 0.7);
    const eta = new Float64Array(41);
    integrateSystem(one, th, t, eta, null, { inflows: [meter], free: new Int32Array(0) });
    // η(t) = η0 + (1/A)·∫0^t Q dt, and the integral of a piecewise-linear Q is the trapezoid sum (ordinary calculus)
    const integral = (x: number): number => {
      const ts = meter.timeS!,
        qs = meter.flowM3S!;
      let v = 0;
      for (let i = 1; i < ts.length && ts[i - 1] < x; i++) {
        const b = Math.min(ts[i], x);
        const qb = qs[i - 1] + ((qs[i] - qs[i - 1]) * (b - ts[i - 1])) / (ts[i] - ts[i - 1]);
        v += 0.5 * (qs[i - 1] + qb) * (b - ts[i - 1]);
      }
      return v;
    };
    for (let i = 0; i < 41; i++)
      expect(Math.abs(eta[i] - (0.5 + integral(t[i]) / area))).toBeLessThan(1e-9);
  });

  it('a draining vessel fed by a cycling pump agrees with a fine-step reference (RK4 at 0.01 s, written here)', () => {
    const cd = 0.61;
    const th = truthTheta(one, [cd], [1.8]);
    const meter: InflowInput = {
      vessel: 0,
      timeS: Float64Array.from({ length: 601 }, (_, i) => i),
      flowM3S: new Float64Array(601),
    };
    meter.flowM3S!.set(Array.from(meter.timeS!, pump));
    const ca = th[P.effectiveArea];
    const zo = one.vessels[0].outletElevationM;
    // Torricelli with the inflow interpolated linearly (field notes: A·dh/dt = Q_in − Cd·a·sqrt(2gH))
    const qAt = (x: number) => {
      const i = Math.min(Math.floor(x), 599);
      return meter.flowM3S![i] + (meter.flowM3S![i + 1] - meter.flowM3S![i]) * (x - i);
    };
    const f = (x: number, h: number) => (qAt(x) - ca * Math.sqrt(2 * G * (h - zo))) / area;
    const ref: number[] = [1.8];
    let h = 1.8;
    const dt = 0.01;
    for (let s = 0; s < 60000; s++) {
      const x = s * dt;
      const k1 = f(x, h),
        k2 = f(x + dt / 2, h + (dt / 2) * k1),
        k3 = f(x + dt / 2, h + (dt / 2) * k2),
        k4 = f(x + dt, h + dt * k3);
      h += (dt / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
      if ((s + 1) % 1000 === 0) ref.push(h);
    }
    const t = Float64Array.from({ length: 61 }, (_, i) => i * 10);
    const eta = new Float64Array(61);
    integrateSystem(one, th, t, eta, null, { inflows: [meter], free: new Int32Array(0) });
    let worst = 0;
    for (let i = 0; i < 61; i++) worst = Math.max(worst, Math.abs(eta[i] - ref[i]));
    expect(worst).toBeLessThan(1e-6); // 1 µm, as above
  });
});

describe("inflowOnFitClock: the log placed on the levels' clock", () => {
  const t0 = Date.UTC(2026, 3, 7, 9, 0, 0);
  const levels = [0, 1].map((v) => ({
    vessel: v,
    fileName: `v${v}.csv`,
    timeS: Float64Array.from({ length: 101 }, (_, i) => i * 2),
    levelM: new Float64Array(101).fill(1),
    t0EpochMs: t0 + 10_000,
  }));
  const series = (start: number, end: number, abs: boolean): FlowSeries => ({
    fileName: 'pump.csv',
    unit: 'L/s',
    column: 'flow',
    warnings: [],
    timeS: Float64Array.from({ length: end - start + 1 }, (_, i) => i),
    flowM3S: Float64Array.from({ length: end - start + 1 }, (_, i) => (start + i) * 1e-6),
    t0EpochMs: abs ? t0 + start * 1000 : null,
  });

  it('shifts by the timestamps and keeps only the samples that bracket the span', () => {
    const a = alignLogs(levels, { startS: 20, endS: 100 });
    const f = inflowOnFitClock(series(0, 400, true), 1, a);
    // the fit's t = 0 is 10 s (first level sample) + 20 s (window) after the log's first reading
    expect(f.timeS![0]).toBe(0);
    expect(f.flowM3S![0]).toBeCloseTo(30e-6, 15);
    expect(f.timeS![f.timeS!.length - 1]).toBe(80);
    expect(f.vessel).toBe(1);
  });

  it("elapsed-time logs: placed on the levels' elapsed time (t = 0 at their latest first sample)", () => {
    const bare = levels.map((l, i) => ({
      ...l,
      t0EpochMs: null,
      timeS: Float64Array.from(l.timeS, (t) => t + 5 * i),
    }));
    const a = alignLogs(bare);
    const f = inflowOnFitClock(series(0, 400, false), 0, a);
    // the second log starts at 5 s, so the flow reading at 5 s is the fit's t = 0
    expect(f.timeS![0]).toBe(0);
    expect(f.flowM3S![0]).toBeCloseTo(5e-6, 15);
    expect(() => inflowOnFitClock(series(0, 400, true), 0, a)).toThrow(
      /has timestamps while the level logs have elapsed time only/,
    );
  });

  it('the system file takes a unit for a log and refuses one that is not a flow unit', () => {
    const body = (unit: string) => ({
      name: 'x',
      vessels: rigSpecBody(),
      inflows: [{ to: 'T1', log: 'pump.csv', unit }],
    });
    expect(validateSystem(body('L/min')).inflows[0]).toEqual({
      to: 'T1',
      log: 'pump.csv',
      unit: 'L/min',
    });
    expect(() => validateSystem(body('m'))).toThrow(/not a flow unit/);
  });

  it('refuses a log that does not cover the fitted span, naming both spans', () => {
    const a = alignLogs(levels);
    expect(() => inflowOnFitClock(series(15, 400, true), 0, a)).toThrow(
      /covers 2026-04-07T09:00:15.000Z to 2026-04-07T09:06:40.000Z but the fitted span is 2026-04-07T09:00:10.000Z to 2026-04-07T09:03:30.000Z/,
    );
    expect(() => inflowOnFitClock(series(0, 150, true), 0, a)).toThrow(/fitted span/);
    expect(() => inflowOnFitClock(series(0, 400, false), 0, a)).toThrow(/elapsed time only/);
  });
});

describe('joint fit with a logged, varying inflow (simulated, invented rig)', () => {
  it('a cycling pump into the top vessel: every Cd·a recovered within 0.5 % and inside its 95 % interval', () => {
    const net = rig(TWO_FREE);
    const truth = truthTheta(net, [0.61, 0.63], [1.9, 0.6]);
    const durationS = 900;
    const logs = simulateSystemTest({
      network: net,
      theta: truth,
      inflows: [pumpTruth(0, durationS + 5)],
      durationS,
      sampleIntervalS: [1, 2],
      sampleOffsetS: [0, 0.3],
      noiseM: 0.0015,
      noiseLag1: 0.4,
      quantumM: 0.001,
      seed: 23,
    });
    const t0 = Date.UTC(2026, 3, 7, 9, 0, 0);
    const aligned = alignLogs(
      logs.map((l) => ({ ...l, fileName: `v${l.vessel}.csv`, t0EpochMs: t0 })),
    );
    // the meter reads every 2 s, from 4 s before the levels start, to 0.01 L/s
    const lines = ['timestamp,inflow [L/s]'];
    for (let s = -4; s <= durationS + 4; s += 2)
      lines.push(`${new Date(t0 + s * 1000).toISOString()},${(pump(s) * 1000).toFixed(2)}`);
    const meter = readFlowLog(enc(lines.join('\n') + '\n'), 'pump.csv');
    const inflow = inflowOnFitClock(meter, 0, aligned);
    const fit = fitSystem({ network: net, logs: aligned.logs, inflows: [inflow] });
    expect(fit.converged).toBe(true);
    net.vessels.forEach((v, i) => {
      const a = fit.outlets[v.id].effectiveAreaM2;
      const t = truth[i * PER_VESSEL + P.effectiveArea];
      expect(Math.abs(a.value / t - 1)).toBeLessThan(0.005);
      expect(a.ci95[0]).toBeLessThanOrEqual(t);
      expect(a.ci95[1]).toBeGreaterThanOrEqual(t);
    });
    // the same test fitted as if the pump's mean flow were constant is visibly wrong (the log matters)
    let mean = 0;
    for (let s = 0; s < durationS; s++) mean += pump(s + 0.5) / durationS;
    const wrong = fitSystem({
      network: net,
      logs: aligned.logs,
      inflows: [{ vessel: 0, constantM3S: mean }],
    });
    const worst = Math.max(
      ...net.vessels.map((v, i) =>
        Math.abs(
          wrong.outlets[v.id].effectiveAreaM2.value / truth[i * PER_VESSEL + P.effectiveArea] - 1,
        ),
      ),
    );
    const rmsWrong = Math.sqrt(
      wrong.residuals[0].reduce((s, r) => s + r * r, 0) / wrong.residuals[0].length,
    );
    const rmsRight = Math.sqrt(
      fit.residuals[0].reduce((s, r) => s + r * r, 0) / fit.residuals[0].length,
    );
    expect(worst > 0.005 || rmsWrong > 2 * rmsRight).toBe(true);
  });
});

describe('meanFlowOverSpan', () => {
  it('is the exact average of the broken line over the span (closed forms)', () => {
    // constant: the constant
    expect(meanFlowOverSpan([-5, 200], [0.002, 0.002], 100)).toBeCloseTo(0.002, 15);
    // ramp 0 → 1 over 0..10 s: average 0.5
    expect(meanFlowOverSpan([0, 10], [0, 1], 10)).toBeCloseTo(0.5, 15);
    // readings bracketing the span: the line from (-10, 0) to (10, 2) is 1 at 0 and 2 at 10 → 1.5
    expect(meanFlowOverSpan([-10, 10], [0, 2], 10)).toBeCloseTo(1.5, 15);
    // a pulse 1 for 0..4 s with 2 s ramps to 0 at 6 s, span 10: area 4 + 1 = 5 → 0.5
    expect(meanFlowOverSpan([0, 4, 6, 10], [1, 1, 0, 0], 10)).toBeCloseTo(0.5, 15);
  });
});
