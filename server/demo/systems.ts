/**
 * sample-data/systems/: three invented connected-vessel tests at the fictional Kestrel Fen works,
 * made by the coupled simulator with the truth recorded in truth.json. Pure apart from the fixed
 * scenario (seeded noise), so regenerating gives the same bytes; a test compares them with the
 * committed files. Write them with: npx tsx server/demo/systems.ts [folder]
 */
import { buildNetwork, P, PER_VESSEL, type InflowInput } from '../core/system/network.js';
import { validateSystem } from '../core/system/schema.js';
import { simulateSystemTest } from '../core/system/simulate.js';

const SITE = 'Kestrel Fen works (fictional)';

interface DemoSystem {
  file: string;
  name: string;
  startIso: string;
  durationS: number;
  seed: number;
  vessels: Array<{
    id: string;
    name: string;
    diameterM: number;
    heightM: number;
    boreM: number;
    outletM: number;
    zeroM: number;
    baseM: number;
    to: string | null;
    connection: 'free' | 'submerged';
    cd: number;
    startSurfaceM: number;
    log: string;
    intervalS: number;
    offsetS: number;
  }>;
  inflowM3S?: { to: string; flow: number };
  /** A cycling transfer pump into one vessel, logged by a flow meter (file, reading interval). */
  pump?: {
    to: string;
    log: string;
    intervalS: number;
    onM3S: number;
    periodS: number;
    onS: number;
    rampS: number;
    phaseS: number;
  };
}

/** The pump's true flow at t (s): ramps up, runs, ramps down, rests; repeating. */
function pumpFlow(p: NonNullable<DemoSystem['pump']>, t: number): number {
  const u = (((t + p.phaseS) % p.periodS) + p.periodS) % p.periodS;
  if (u < p.rampS) return (p.onM3S * u) / p.rampS;
  if (u < p.rampS + p.onS) return p.onM3S;
  if (u < 2 * p.rampS + p.onS) return (p.onM3S * (2 * p.rampS + p.onS - u)) / p.rampS;
  return 0;
}

export const DEMO_SYSTEMS: DemoSystem[] = [
  {
    file: 'filter-chain.system.json',
    name: 'Filter feed chain (fictional)',
    startIso: '2026-04-07T09:00:00Z',
    durationS: 900,
    seed: 71,
    vessels: [
      {
        id: 'FT1',
        name: 'Feed tank FT-1',
        diameterM: 1.4,
        heightM: 2.6,
        boreM: 0.05,
        outletM: 0.1,
        zeroM: 0.05,
        baseM: 3.0,
        to: 'BT2',
        connection: 'free',
        cd: 0.611,
        startSurfaceM: 2.2,
        log: 'ft1-2026-04-07.csv',
        intervalS: 1,
        offsetS: 0,
      },
      {
        id: 'BT2',
        name: 'Break tank BT-2',
        diameterM: 1.2,
        heightM: 2.4,
        boreM: 0.045,
        outletM: 0.08,
        zeroM: 0.04,
        baseM: 0.5,
        to: null,
        connection: 'free',
        cd: 0.804,
        startSurfaceM: 0.7,
        log: 'bt2-2026-04-07.csv',
        intervalS: 2,
        offsetS: 0.5,
      },
    ],
  },
  {
    file: 'rinse-cascade.system.json',
    name: 'Rinse cascade (fictional)',
    startIso: '2026-04-08T13:30:00Z',
    durationS: 1200,
    seed: 72,
    inflowM3S: { to: 'RC1', flow: 0.0005 },
    vessels: [
      {
        id: 'RC1',
        name: 'Rinse cell RC-1',
        diameterM: 1.0,
        heightM: 2.5,
        boreM: 0.04,
        outletM: 0.1,
        zeroM: 0.05,
        baseM: 1.0,
        to: 'RC2',
        connection: 'submerged',
        cd: 0.62,
        startSurfaceM: 2.2,
        log: 'rc1-2026-04-08.csv',
        intervalS: 1,
        offsetS: 0,
      },
      {
        id: 'RC2',
        name: 'Rinse cell RC-2',
        diameterM: 1.1,
        heightM: 2.5,
        boreM: 0.05,
        outletM: 0.1,
        zeroM: 0.05,
        baseM: 1.0,
        to: 'SW3',
        connection: 'free',
        cd: 0.605,
        startSurfaceM: 0.8,
        log: 'rc2-2026-04-08.csv',
        intervalS: 1,
        offsetS: 0.25,
      },
      {
        id: 'SW3',
        name: 'Sump well SW-3',
        diameterM: 1.3,
        heightM: 3.0,
        boreM: 0.05,
        outletM: 0.08,
        zeroM: 0.04,
        baseM: 0,
        to: null,
        connection: 'free',
        cd: 0.64,
        startSurfaceM: 1.0,
        log: 'sw3-2026-04-08.csv',
        intervalS: 1,
        offsetS: 0.5,
      },
    ],
  },
  {
    file: 'wash-transfer.system.json',
    name: 'Wash water transfer (fictional)',
    startIso: '2026-04-09T07:15:00Z',
    durationS: 900,
    seed: 73,
    pump: {
      to: 'WT4',
      log: 'pump-2026-04-09.csv',
      intervalS: 2,
      onM3S: 0.0015,
      periodS: 240,
      onS: 100,
      rampS: 6,
      phaseS: 37,
    },
    vessels: [
      {
        id: 'WT4',
        name: 'Wash tank WT-4',
        diameterM: 1.2,
        heightM: 2.5,
        boreM: 0.05,
        outletM: 0.1,
        zeroM: 0.05,
        baseM: 2.5,
        to: 'HT5',
        connection: 'free',
        cd: 0.615,
        startSurfaceM: 1.9,
        log: 'wt4-2026-04-09.csv',
        intervalS: 1,
        offsetS: 0,
      },
      {
        id: 'HT5',
        name: 'Holding tank HT-5',
        diameterM: 1.0,
        heightM: 2.5,
        boreM: 0.045,
        outletM: 0.08,
        zeroM: 0.04,
        baseM: 0,
        to: null,
        connection: 'free',
        cd: 0.63,
        startSurfaceM: 0.6,
        log: 'ht5-2026-04-09.csv',
        intervalS: 2,
        offsetS: 0.3,
      },
    ],
  },
];

function systemFile(d: DemoSystem) {
  return {
    name: d.name,
    site: SITE,
    notes: 'Invented for the demo: connected vessels logged during one drain test.',
    vessels: d.vessels.map((v) => ({
      id: v.id,
      name: v.name,
      shape: { kind: 'vertical-cylinder', diameterM: v.diameterM, heightM: v.heightM },
      outlet: {
        boreM: v.boreM,
        boreToleranceM: 0.0002,
        elevationM: v.outletM,
        type: 'sharp-edged',
      },
      sensor: { zeroElevationM: v.zeroM },
      dischargesTo: v.to,
      connection: v.connection,
      baseElevationM: v.baseM,
    })),
    ...(d.inflowM3S
      ? { inflows: [{ to: d.inflowM3S.to, constant: `${d.inflowM3S.flow * 1000} L/s` }] }
      : {}),
    ...(d.pump ? { inflows: [{ to: d.pump.to, log: d.pump.log }] } : {}),
  };
}

/** Every file of sample-data/systems/ (README.md aside) as text, by name. */
export function buildSystemSampleData(): Record<string, string> {
  const files: Record<string, string> = {};
  const truth: unknown[] = [];
  for (const d of DEMO_SYSTEMS) {
    const body = systemFile(d);
    files[d.file] = JSON.stringify(body, null, 2) + '\n';
    const network = buildNetwork(validateSystem(body, d.file));
    const theta = new Float64Array(d.vessels.length * PER_VESSEL);
    d.vessels.forEach((v, i) => {
      theta[i * PER_VESSEL + P.effectiveArea] = (v.cd * Math.PI * v.boreM ** 2) / 4;
      theta[i * PER_VESSEL + P.sensorZero] = v.zeroM;
      theta[i * PER_VESSEL + P.initialReading] = v.startSurfaceM - v.zeroM;
    });
    const inflows: InflowInput[] = d.inflowM3S
      ? [
          {
            vessel: d.vessels.findIndex((v) => v.id === d.inflowM3S!.to),
            constantM3S: d.inflowM3S.flow,
          },
        ]
      : [];
    const t0 = Date.parse(d.startIso);
    if (d.pump) {
      const p = d.pump;
      // the truth at 0.5 s (exact for this piecewise-linear cycle); the meter reads every intervalS
      // from a little before the levels to a little after, to 0.001 L/s
      const timeS = Float64Array.from({ length: 2 * d.durationS + 21 }, (_, i) => i * 0.5 - 5);
      inflows.push({
        vessel: d.vessels.findIndex((v) => v.id === p.to),
        timeS,
        flowM3S: Float64Array.from(timeS, (t) => pumpFlow(p, t)),
      });
      const lines = [
        `Site: ${SITE}`,
        'Meter: transfer pump discharge, invented',
        '',
        'timestamp,inflow (L/s)',
      ];
      for (let t = -4; t <= d.durationS + 4; t += p.intervalS)
        lines.push(
          `${new Date(t0 + t * 1000).toISOString()},${(pumpFlow(p, t) * 1000).toFixed(3)}`,
        );
      files[p.log] = lines.join('\n') + '\n';
    }
    const logs = simulateSystemTest({
      network,
      theta,
      inflows,
      durationS: d.durationS,
      sampleIntervalS: d.vessels.map((v) => v.intervalS),
      sampleOffsetS: d.vessels.map((v) => v.offsetS),
      noiseM: 0.0015,
      noiseLag1: 0.4,
      quantumM: 0.001,
      seed: d.seed,
    });
    d.vessels.forEach((v, i) => {
      const l = logs[i];
      const lines = [
        `Site: ${SITE}`,
        `Vessel: ${v.name}`,
        'Record: connected-vessel drain test, invented',
        '',
        'timestamp,level (m)',
      ];
      for (let s = 0; s < l.timeS.length; s++)
        lines.push(
          `${new Date(t0 + Math.round(l.timeS[s] * 1000)).toISOString()},${l.levelM[s].toFixed(4)}`,
        );
      files[v.log] = lines.join('\n') + '\n';
    });
    truth.push({
      system: d.file,
      testedAt: d.startIso,
      logs: Object.fromEntries(d.vessels.map((v) => [v.id, v.log])),
      truth: Object.fromEntries(
        d.vessels.map((v) => [
          v.id,
          {
            dischargeCoefficient: v.cd,
            effectiveAreaM2: (v.cd * Math.PI * v.boreM ** 2) / 4,
            startSurfaceM: v.startSurfaceM,
          },
        ]),
      ),
      inflowM3S: d.inflowM3S ?? null,
      ...(d.pump
        ? {
            inflowLog: {
              to: d.pump.to,
              file: d.pump.log,
              cycle: {
                onM3S: d.pump.onM3S,
                periodS: d.pump.periodS,
                onS: d.pump.onS,
                rampS: d.pump.rampS,
              },
            },
          }
        : {}),
      noise: { sdM: 0.0015, lag1: 0.4, quantumM: 0.001 },
      invented: true,
    });
  }
  files['truth.json'] =
    JSON.stringify(
      { format: 'efflux-demo-systems', version: 1, site: SITE, tests: truth },
      null,
      2,
    ) + '\n';
  return files;
}

// run as a script: write the files
if (process.argv[1] && import.meta.url.endsWith(process.argv[1].replace(/^.*[\\/]/, '/'))) {
  const { mkdirSync, writeFileSync } = await import('node:fs');
  const { join, resolve } = await import('node:path');
  const out = resolve(process.argv[2] ?? 'sample-data/systems');
  mkdirSync(out, { recursive: true });
  for (const [name, text] of Object.entries(buildSystemSampleData())) {
    writeFileSync(join(out, name), text);
    process.stdout.write(`wrote ${name}\n`);
  }
}
