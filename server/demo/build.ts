import { makeShape } from '../core/geometry/index.js';
import { simulateDrainTest } from '../core/drain/simulate.js';
import { STANDARD_GRAVITY_MS2 } from '../core/units/index.js';
import { writeLog } from './layouts.js';
import { expandHistories } from './history.js';
import { HISTORIES, SITE, TESTS, VESSELS, type DemoTest, type DemoVessel } from './scenario.js';

/** Every sample-data file as bytes, by file name (pure apart from the fixed scenario). */
export function buildSampleData(): Record<string, Uint8Array> {
  const enc = new TextEncoder();
  const files: Record<string, Uint8Array> = {};
  for (const v of VESSELS)
    files[v.file] = enc.encode(JSON.stringify(vesselFile(v), null, 2) + '\n');
  const manifestTests: Record<string, unknown>[] = [];
  for (const t of TESTS) {
    const v = VESSELS.find((x) => x.name === t.vessel)!;
    const { timeS, levelM } = simulateTest(t, v);
    const out = writeLog(t, v, timeS, levelM);
    files[t.log] = out.encoding === 'utf16le' ? utf16le(out.text) : enc.encode(out.text);
    if (out.baro && t.baro) files[t.baro] = enc.encode(out.baro);
    const nominal = (Math.PI * v.outlet.boreM ** 2) / 4;
    manifestTests.push({
      vessel: v.name,
      site: SITE,
      outlet: v.outlet.id,
      log: t.log,
      ...(t.baro ? { baro: t.baro } : {}),
      settings: t.settings,
      operator: t.operator,
      loggerId: t.loggerId,
      testedAt: t.startIso,
      notes: t.notes,
      layout: t.layout,
      truth: {
        dischargeCoefficient: t.cd,
        effectiveAreaM2: t.cd * nominal,
        inflowM3S: t.inflowM3S ?? 0,
        invented: true,
      },
    });
  }
  // Months of approved tests on three outlets, for the trend (server/demo/history.ts).
  const history = expandHistories();
  for (const h of HISTORIES)
    files[h.vessel.file] = enc.encode(JSON.stringify(vesselFile(h.vessel), null, 2) + '\n');
  for (const { history: h, month, test: t } of history.tests) {
    const { timeS, levelM } = simulateTest(t, h.vessel);
    files[t.log] = enc.encode(writeLog(t, h.vessel, timeS, levelM).text);
    const nominal = (Math.PI * h.vessel.outlet.boreM ** 2) / 4;
    manifestTests.push({
      vessel: h.vessel.name,
      site: SITE,
      outlet: h.vessel.outlet.id,
      log: t.log,
      settings: t.settings,
      operator: t.operator,
      loggerId: t.loggerId,
      testedAt: t.startIso,
      notes: t.notes,
      layout: t.layout,
      review: { decision: 'approve', comment: 'Routine monthly test; fit checked (demo).' },
      history: { outlet: h.logPrefix, month },
      truth: {
        dischargeCoefficient: t.cd,
        effectiveAreaM2: t.cd * nominal,
        inflowM3S: 0,
        invented: true,
      },
    });
  }
  const manifest = {
    format: 'efflux-demo',
    version: 1,
    description: `${SITE}: invented vessels and simulated drain tests for the demo and the tests. Not real data.`,
    vessels: [...VESSELS, ...HISTORIES.map((h) => h.vessel)].map((v) => ({ file: v.file })),
    tests: manifestTests,
    events: history.events.map((e) => ({
      vessel: e.history.vessel.name,
      site: SITE,
      outlet: e.history.vessel.outlet.id,
      kind: e.kind,
      occurredAt: e.occurredAt,
      notes: e.notes,
    })),
  };
  files['manifest.json'] = enc.encode(JSON.stringify(manifest, null, 2) + '\n');
  return files;
}

function vesselFile(v: DemoVessel) {
  return {
    name: v.name,
    site: SITE,
    // every demo vessel's name ends with the tag painted on it ("Filter drain tank FD-2")
    tag: v.name.split(' ').pop(),
    shape: v.shape,
    outlet: v.outlet,
    ...(v.sensor ? { sensor: v.sensor } : {}),
    ...(v.fluid ? { fluid: v.fluid } : {}),
    notes: `${v.notes} Invented for the demo.`,
  };
}

function simulateTest(t: DemoTest, v: DemoVessel): { timeS: Float64Array; levelM: Float64Array } {
  const setting = {
    shape: makeShape(v.shape),
    outletElevationM: v.outlet.elevationM,
    gravity: STANDARD_GRAVITY_MS2,
  };
  const zero = v.sensor?.zeroElevationM ?? 0;
  const sim = simulateDrainTest({
    setting,
    effectiveAreaM2: t.cd * ((Math.PI * v.outlet.boreM ** 2) / 4),
    initialSurfaceM: t.initialSurfaceM,
    sensorZeroElevationM: zero,
    inflowM3S: t.inflowM3S,
    sampleIntervalS: t.sampleIntervalS,
    holdBeforeS: t.holdBeforeS,
    drainS: t.drainS,
    holdAfterS: t.holdAfterS,
    noiseM: t.noiseM,
    noiseLag1: t.noiseLag1,
    quantumM: 0.001,
    sloshM: 0.004,
    spikes: t.spikes,
    seed: t.seed,
  });
  if (t.layout !== 'tab-local-zone-fill-hold') return sim;
  // a fill, a short partial drain (a valve check), a second fill, then the simulated hold–drain–hold
  const dt = t.sampleIntervalS;
  const pre: number[] = [];
  const ramp = (from: number, to: number, seconds: number) => {
    for (let s = 0; s < seconds; s += dt) pre.push(from + ((to - from) * s) / seconds);
  };
  const start = sim.levelM[0];
  ramp(0.35, 1.2, 400);
  ramp(1.2, 1.2, 120);
  ramp(1.2, 0.95, 240);
  ramp(0.95, 0.95, 120);
  ramp(0.95, start, 700);
  const k = pre.length;
  const timeS = new Float64Array(k + sim.timeS.length);
  const levelM = new Float64Array(k + sim.timeS.length);
  for (let i = 0; i < k; i++) {
    timeS[i] = i * dt;
    levelM[i] = Math.round((pre[i] + 0.0015 * Math.sin(i * 1.7)) * 1000) / 1000;
  }
  for (let i = 0; i < sim.timeS.length; i++) {
    timeS[k + i] = k * dt + sim.timeS[i];
    levelM[k + i] = sim.levelM[i];
  }
  return { timeS, levelM };
}

function utf16le(text: string): Uint8Array {
  const out = new Uint8Array(2 + text.length * 2);
  out[0] = 0xff;
  out[1] = 0xfe;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[2 + 2 * i] = c & 0xff;
    out[3 + 2 * i] = c >> 8;
  }
  return out;
}
