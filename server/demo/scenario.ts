import type { ShapeSpec } from '../core/geometry/index.js';

/**
 * The invented demo scenario: Kestrel Fen, a fictional water treatment works, its vessels, and
 * the drain tests its technicians logged. Every number here is made up for the demo; the logs are
 * produced by the project's own simulator, and each test records the true Cd it was made with.
 */
export const SITE = 'Kestrel Fen works (fictional)';

export interface DemoVessel {
  file: string;
  name: string;
  shape: ShapeSpec;
  outlet: { id: string; boreM: number; boreToleranceM: number; elevationM: number; type: string };
  sensor?: { zeroElevationM?: number; mountElevationM?: number };
  fluid?: { temperatureC: number } | { densityKgM3: number };
  notes: string;
}

export type Layout =
  | 'preamble-iso-m'
  | 'semicolon-comma-dmy-cm'
  | 'mdy-12h-ft'
  | 'epoch-gauge-kpa-tempf'
  | 'elapsed-mm'
  | 'date-time-columns-abs-kpa'
  | 'radar-distance-iso-offset'
  | 'tab-local-zone-fill-hold'
  | 'serial-days-duplicates'
  | 'pipe-epoch-ms-inflow'
  | 'history-elapsed-m';

export interface DemoTest {
  log: string;
  vessel: string;
  layout: Layout;
  cd: number;
  initialSurfaceM: number;
  inflowM3S?: number;
  sampleIntervalS: number;
  holdBeforeS: number;
  drainS: number;
  holdAfterS: number;
  noiseM: number;
  noiseLag1?: number;
  spikes?: number;
  startIso: string;
  /** What a person states for this file (CLI flags / upload fields). */
  settings: Record<string, string | boolean>;
  baro?: string;
  operator: string;
  loggerId: string;
  notes: string;
  seed: number;
}

export const VESSELS: DemoVessel[] = [
  {
    file: 'backwash-tank-fb1.vessel.json',
    name: 'Backwash tank FB-1',
    shape: { kind: 'vertical-cylinder', diameterM: 3.2, heightM: 4.0 },
    outlet: {
      id: 'drain',
      boreM: 0.05,
      boreToleranceM: 0.0002,
      elevationM: 0.1,
      type: 'sharp-edged',
    },
    sensor: { zeroElevationM: 0.1 },
    fluid: { temperatureC: 12 },
    notes: 'Flat-bottomed steel tank; gauge transducer at the drain centreline.',
  },
  {
    file: 'rinse-tank-r3.vessel.json',
    name: 'Rinse tank R-3',
    shape: { kind: 'rectangular', lengthM: 2.4, widthM: 1.6, heightM: 1.8 },
    outlet: {
      id: 'drain',
      boreM: 0.032,
      boreToleranceM: 0.0001,
      elevationM: 0.0,
      type: 'sharp-edged',
    },
    sensor: { zeroElevationM: 0.0 },
    notes: 'Open stainless rinse tank.',
  },
  {
    file: 'day-tank-d2.vessel.json',
    name: 'Day tank D-2',
    shape: { kind: 'horizontal-cylinder', diameterM: 1.8, lengthM: 4.5 },
    outlet: {
      id: 'bottom',
      boreM: 0.025,
      boreToleranceM: 0.0001,
      elevationM: 0.0,
      type: 'square-edged-short-tube',
    },
    sensor: { zeroElevationM: 0.0 },
    notes: 'Horizontal day tank on saddles; short outlet stub.',
  },
  {
    file: 'lime-hopper-h1.vessel.json',
    name: 'Lime slurry hopper H-1',
    shape: { kind: 'cone-bottom', diameterM: 2.2, coneHeightM: 1.4, heightM: 4.0 },
    outlet: {
      id: 'apex',
      boreM: 0.04,
      boreToleranceM: 0.0002,
      elevationM: 0.0,
      type: 'sharp-edged',
    },
    sensor: { zeroElevationM: 0.0 },
    fluid: { temperatureC: 15 },
    notes: 'Commissioning test with water; gauge transducer at the apex.',
  },
  {
    file: 'surge-sphere-s1.vessel.json',
    name: 'Surge sphere S-1',
    shape: { kind: 'sphere', diameterM: 3.0 },
    outlet: { id: 'bottom', boreM: 0.03, boreToleranceM: 0.0001, elevationM: 0.0, type: 'rounded' },
    sensor: { zeroElevationM: 0.05 },
    notes: 'Spherical surge vessel; level probe zero 50 mm above the bottom.',
  },
  {
    file: 'process-vessel-p4.vessel.json',
    name: 'Process vessel P-4',
    shape: { kind: 'elliptical-head-cylinder', diameterM: 2.0, heightM: 4.5 },
    outlet: {
      id: 'bottom',
      boreM: 0.035,
      boreToleranceM: 0.0002,
      elevationM: 0.0,
      type: 'sharp-edged',
    },
    sensor: { zeroElevationM: 0.0 },
    fluid: { temperatureC: 18 },
    notes: 'Dished-bottom vessel; non-vented pressure logger, barometric logger on the roof.',
  },
  {
    file: 'clearwell-c2.vessel.json',
    name: 'Clearwell C-2',
    shape: { kind: 'vertical-cylinder', diameterM: 4.0, heightM: 5.5 },
    outlet: {
      id: 'drain',
      boreM: 0.06,
      boreToleranceM: 0.0003,
      elevationM: 0.15,
      type: 'sharp-edged',
    },
    sensor: { mountElevationM: 5.2 },
    notes: 'Radar gauge on the roof, reference face 5.2 m above the floor.',
  },
  {
    file: 'detention-sump-ds1.vessel.json',
    name: 'Detention sump DS-1',
    shape: {
      kind: 'table',
      points: [
        [0, 1.2],
        [0.5, 3.1],
        [1.0, 4.6],
        [1.5, 5.6],
        [2.0, 6.3],
        [2.6, 7.0],
      ],
    },
    outlet: {
      id: 'orifice',
      boreM: 0.075,
      boreToleranceM: 0.0005,
      elevationM: 0.05,
      type: 'sharp-edged',
    },
    sensor: { zeroElevationM: 0.0 },
    notes: 'Stormwater sump with sloping walls; stage–area table from the as-built survey.',
  },
];

const common = { holdAfterS: 300, noiseM: 0.0015, operator: 'T. Ashdown (fictional)', spikes: 3 };

export const TESTS: DemoTest[] = [
  {
    ...common,
    log: 'fb1-2026-03-10-preamble.csv',
    vessel: 'Backwash tank FB-1',
    layout: 'preamble-iso-m',
    cd: 0.612,
    initialSurfaceM: 3.6,
    sampleIntervalS: 1,
    holdBeforeS: 120,
    drainS: 1900,
    startIso: '2026-03-10T08:15:00Z',
    settings: {},
    loggerId: 'KF-LG-01',
    notes: 'Routine annual test.',
    seed: 11,
  },
  {
    ...common,
    log: 'r3-2026-03-19-semicolon.csv',
    vessel: 'Rinse tank R-3',
    layout: 'semicolon-comma-dmy-cm',
    cd: 0.605,
    initialSurfaceM: 1.6,
    sampleIntervalS: 2,
    holdBeforeS: 60,
    drainS: 1300,
    startIso: '2026-03-19T13:02:00Z',
    settings: {},
    loggerId: 'KF-LG-02',
    notes: 'After the weekly clean.',
    seed: 12,
  },
  {
    ...common,
    log: 'd2-2026-03-20-12h-ft.csv',
    vessel: 'Day tank D-2',
    layout: 'mdy-12h-ft',
    cd: 0.81,
    initialSurfaceM: 1.65,
    sampleIntervalS: 2,
    holdBeforeS: 60,
    drainS: 2400,
    startIso: '2026-03-20T15:40:00Z',
    settings: {},
    loggerId: 'KF-LG-03',
    notes: 'Logger set to 12-hour clock by the supplier.',
    seed: 13,
  },
  {
    ...common,
    log: 'h1-2026-03-13-epoch-kpa.csv',
    vessel: 'Lime slurry hopper H-1',
    layout: 'epoch-gauge-kpa-tempf',
    cd: 0.63,
    initialSurfaceM: 3.7,
    sampleIntervalS: 1,
    holdBeforeS: 90,
    drainS: 1500,
    startIso: '2026-03-13T09:00:00Z',
    settings: {},
    loggerId: 'KF-LG-04',
    notes: 'Gauge pressure at the apex, water temperature logged.',
    seed: 14,
  },
  {
    ...common,
    log: 's1-2026-03-14-elapsed-mm.csv',
    vessel: 'Surge sphere S-1',
    layout: 'elapsed-mm',
    cd: 0.93,
    initialSurfaceM: 2.75,
    sampleIntervalS: 2,
    holdBeforeS: 60,
    drainS: 1700,
    startIso: '2026-03-14T10:00:00Z',
    settings: {},
    loggerId: 'KF-LG-05',
    notes: 'Elapsed-time logger.',
    seed: 15,
  },
  {
    ...common,
    log: 'p4-2026-03-16-absolute.csv',
    vessel: 'Process vessel P-4',
    layout: 'date-time-columns-abs-kpa',
    cd: 0.62,
    initialSurfaceM: 4.1,
    sampleIntervalS: 1,
    holdBeforeS: 90,
    drainS: 1800,
    startIso: '2026-03-16T07:30:00Z',
    settings: {},
    baro: 'p4-2026-03-16-baro.csv',
    loggerId: 'KF-LG-06',
    notes: 'Non-vented logger; barometric series from KF-LG-07.',
    seed: 16,
  },
  {
    ...common,
    log: 'c2-2026-03-17-radar.csv',
    vessel: 'Clearwell C-2',
    layout: 'radar-distance-iso-offset',
    cd: 0.6,
    initialSurfaceM: 4.8,
    sampleIntervalS: 2,
    holdBeforeS: 120,
    drainS: 3000,
    startIso: '2026-03-17T06:45:00Z',
    settings: {},
    loggerId: 'KF-RG-01',
    notes: 'Radar distance from the roof.',
    seed: 17,
    noiseLag1: 0.8,
  },
  {
    ...common,
    log: 'ds1-2026-06-18-fill-hold-drain.tsv',
    vessel: 'Detention sump DS-1',
    layout: 'tab-local-zone-fill-hold',
    cd: 0.61,
    initialSurfaceM: 2.3,
    sampleIntervalS: 2,
    holdBeforeS: 300,
    drainS: 1500,
    startIso: '2026-06-18T13:00:00Z',
    settings: { tz: 'Europe/Lisbon' },
    loggerId: 'KF-LG-08',
    notes: 'Filled from the hydrant, held, drained, held; clock in local time.',
    seed: 18,
  },
  {
    ...common,
    log: 'r3-2026-03-25-serial-days.csv',
    vessel: 'Rinse tank R-3',
    layout: 'serial-days-duplicates',
    cd: 0.598,
    initialSurfaceM: 1.55,
    sampleIntervalS: 2,
    holdBeforeS: 60,
    drainS: 1300,
    startIso: '2026-03-25T10:20:00Z',
    settings: {},
    loggerId: 'KF-LG-02',
    notes: 'Exported through a spreadsheet; some rows pasted twice.',
    seed: 19,
  },
  {
    ...common,
    log: 'fb1-2026-03-26-leaking-inlet.csv',
    vessel: 'Backwash tank FB-1',
    layout: 'pipe-epoch-ms-inflow',
    cd: 0.609,
    inflowM3S: 0.0009,
    initialSurfaceM: 3.5,
    sampleIntervalS: 1,
    holdBeforeS: 60,
    drainS: 2200,
    startIso: '2026-03-26T08:00:00Z',
    settings: { fitInflow: true },
    loggerId: 'KF-LG-01',
    notes: 'Inlet valve found passing; fitted with the inflow term.',
    seed: 20,
  },
];

/**
 * Months of routine drain tests on three filter-drain tanks (invented), for the trend view. Each
 * month's true Cd·a comes from simulateFoulingHistory (server/core/trend/simulate.ts) with the
 * settings below; each log is then simulated from that truth by the drain simulator, small
 * (5 s sampling) to keep the repository light. Every test is approved in the manifest.
 */
export interface DemoHistory {
  vessel: DemoVessel;
  /** What the outlet does: for the README and the tests. */
  story: string;
  logPrefix: string;
  seed: number;
  months: number;
  startIso: string;
  driftPctPerYear: number;
  steps?: { month: number; pct: number }[];
  maintenance?: {
    month: number;
    kind?: 'cleaned' | 'replaced' | 'modified';
    restorePct?: number;
    notes: string;
  }[];
}

const filterTank = (n: number, extra: Partial<DemoVessel['outlet']> = {}): DemoVessel => ({
  file: `filter-drain-fd${n}.vessel.json`,
  name: `Filter drain tank FD-${n}`,
  shape: { kind: 'vertical-cylinder', diameterM: 1.2, heightM: 2.5 },
  outlet: {
    id: 'drain',
    boreM: 0.04,
    boreToleranceM: 0.0001,
    elevationM: 0.0,
    type: 'sharp-edged',
    ...extra,
  },
  sensor: { zeroElevationM: 0.0 },
  notes: 'Filter backwash drain tank, tested monthly; gauge transducer at the drain centreline.',
});

export const HISTORIES: DemoHistory[] = [
  {
    vessel: filterTank(1),
    story: 'clean: no drift',
    logPrefix: 'fd1',
    seed: 101,
    months: 18,
    startIso: '2024-10-07T08:00:00Z',
    driftPctPerYear: 0,
  },
  {
    vessel: filterTank(2),
    story:
      'fouling slowly: Cd·a falls 4 % a year (the default action threshold, a 10 % loss, is crossed about 2.5 years in)',
    logPrefix: 'fd2',
    seed: 102,
    months: 18,
    startIso: '2024-10-08T08:00:00Z',
    driftPctPerYear: -4,
  },
  {
    vessel: filterTank(3),
    story: 'partial blockage: a 7 % step down at the tenth test, then a cleaning (new baseline)',
    logPrefix: 'fd3',
    seed: 103,
    months: 18,
    startIso: '2024-10-09T08:00:00Z',
    driftPctPerYear: -1,
    steps: [{ month: 9, pct: -7 }],
    maintenance: [
      {
        month: 13,
        kind: 'cleaned',
        restorePct: 0,
        notes:
          'Drain opened and cleared: a lump of filter media was lodged in the bore (invented).',
      },
    ],
  },
];

export const HISTORY_DRAIN = {
  initialSurfaceM: 2.1,
  sampleIntervalS: 5,
  holdBeforeS: 60,
  drainS: 900,
  holdAfterS: 120,
  noiseM: 0.0015,
};
