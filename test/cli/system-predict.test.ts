import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { efflux, root } from './run-cli.js';

const dir = join(root, 'sample-data/systems');
const cache = join(root, 'node_modules/.cache');
mkdirSync(cache, { recursive: true });
const G = 9.80665; // standard gravity (CGPM 1901)

// the filter chain with every outlet's Cd stated, so predictions need no fit (and carry no interval)
const KNOWN = join(cache, 'efflux-predict-known.system.json');
const known = JSON.parse(readFileSync(join(dir, 'filter-chain.system.json'), 'utf8'));
for (const v of known.vessels) v.dischargeCoefficient = 0.61;
writeFileSync(KNOWN, JSON.stringify(known));
const ft1 = known.vessels[0];
const A = (Math.PI * ft1.shape.diameterM ** 2) / 4;
const CA = (0.61 * Math.PI * ft1.outlet.boreM ** 2) / 4;

describe('efflux fit-system with a logged inflow (sample-data/systems/wash-transfer)', () => {
  const args = [
    'fit-system',
    'sample-data/systems/wash-transfer.system.json',
    '--log',
    'WT4=sample-data/systems/wt4-2026-04-09.csv',
    '--log',
    'HT5=sample-data/systems/ht5-2026-04-09.csv',
    '--json',
  ];

  it('reads the pump log relative to the system file (run from another folder) and reports it', () => {
    const r = efflux(args, { cwd: root });
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    expect(out.diagnostics.inflowLogs).toEqual([
      {
        to: 'WT4',
        file: 'pump-2026-04-09.csv',
        unit: 'L/s',
        samples: 451,
        // the pump: 1.5 L/s for 100 s with 6 s ramps every 240 s (sample-data/systems/README.md),
        // so about 1.5·106/240 ≈ 0.66 L/s on average, give or take the part-cycle at the ends
        meanM3S: expect.any(Number),
        interpolation: 'linear in time between readings',
      },
    ]);
    expect(out.diagnostics.inflowLogs[0].meanM3S).toBeGreaterThan(0.0005);
    expect(out.diagnostics.inflowLogs[0].meanM3S).toBeLessThan(0.0008);
  }, 30_000);

  it('refuses an inflow log that stops before the levels do, naming both spans', () => {
    const pump = readFileSync(join(dir, 'pump-2026-04-09.csv'), 'utf8').split('\n');
    writeFileSync(join(cache, 'pump-short.csv'), pump.slice(0, 300).join('\n') + '\n');
    const sys = JSON.parse(readFileSync(join(dir, 'wash-transfer.system.json'), 'utf8'));
    sys.inflows[0].log = 'pump-short.csv';
    writeFileSync(join(cache, 'wash-short.system.json'), JSON.stringify(sys));
    const r = efflux([
      'fit-system',
      join(cache, 'wash-short.system.json'),
      '--log',
      `WT4=${join(dir, 'wt4-2026-04-09.csv')}`,
      '--log',
      `HT5=${join(dir, 'ht5-2026-04-09.csv')}`,
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /pump-short\.csv.*covers 2026-04-09T07:14:56\.000Z to 2026-04-09T07:24:46\.000Z but the fitted span is 2026-04-09T07:15:00\.300Z to 2026-04-09T07:29:58\.300Z/,
    );
  }, 30_000);
});

describe('efflux predict', () => {
  it('--until on one free-draining vessel matches the closed-form drain time', () => {
    const r = efflux(['predict', KNOWN, '--from', 'FT1=2.2m', '--until', 'FT1=1.0m', '--json']);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    // t = (2A/(Cd·a·sqrt(2g)))·(sqrt(H0) − sqrt(H1)), H above the outlet (Torricelli, constant area; ordinary calculus)
    const h0 = 2.2 - ft1.outlet.elevationM,
      h1 = 1.0 - ft1.outlet.elevationM;
    const exact = ((2 * A) / (CA * Math.sqrt(2 * G))) * (Math.sqrt(h0) - Math.sqrt(h1));
    // 1 ms of about 290 s: the ODE's RK4 error and the crossing's secant step are far smaller
    expect(Math.abs(out.timeS.value - exact)).toBeLessThan(1e-3);
    expect(out.timeS.ci95).toBeNull();
    expect(out.notes.join(' ')).toMatch(/BT2 starts empty/);
  });

  it('--after gives the closed-form level of the free-draining top vessel', () => {
    const r = efflux([
      'predict',
      KNOWN,
      '--from',
      'FT1=2.2m',
      '--from',
      'BT2=40cm',
      '--after',
      '3min',
      '--json',
    ]);
    const out = JSON.parse(r.stdout);
    // sqrt(H(t)) = sqrt(H0) − (Cd·a·sqrt(2g)/(2A))·t (Torricelli, constant area)
    const h =
      (Math.sqrt(2.2 - ft1.outlet.elevationM) - ((CA * Math.sqrt(2 * G)) / (2 * A)) * 180) ** 2 +
      ft1.outlet.elevationM;
    expect(out.afterS).toBe(180);
    expect(Math.abs(out.levelsM.FT1.value - h)).toBeLessThan(1e-6);
    expect(out.startM.BT2).toBeCloseTo(0.4, 12);
  });

  it('from the fit JSON: 95 % intervals around each prediction, in text and JSON', () => {
    const fit = efflux(
      [
        'fit-system',
        'wash-transfer.system.json',
        '--log',
        'WT4=wt4-2026-04-09.csv',
        '--log',
        'HT5=ht5-2026-04-09.csv',
        '--json',
      ],
      { cwd: dir },
    );
    const file = join(cache, 'efflux-wash-fit.json');
    writeFileSync(file, fit.stdout);
    const after = JSON.parse(
      efflux([
        'predict',
        file,
        '--from',
        'WT4=1.9m',
        '--from',
        'HT5=0.6m',
        '--inflow',
        'WT4=1L/s',
        '--after',
        '600',
        '--json',
      ]).stdout,
    );
    for (const id of ['WT4', 'HT5']) {
      const e = after.levelsM[id];
      expect(e.standardUncertainty).toBeGreaterThan(0);
      expect(e.ci95[0]).toBeLessThan(e.value);
      expect(e.ci95[1]).toBeGreaterThan(e.value);
    }
    expect(after.inflowM3S.WT4).toBeCloseTo(0.001, 12);
    const text = efflux(['predict', file, '--from', 'WT4=1.9m', '--until', 'WT4=0.5m']);
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(
      /WT4 falls from 1\.9000 m to 0\.5000 m in [\d.]+ s ± [\d.]+ s \(95 % [\d.]+ \.\. [\d.]+ s\)/,
    );
  }, 30_000);

  it.each([
    [['predict', KNOWN, '--from', 'FT1=2m'], /one of --after/],
    [
      ['predict', KNOWN, '--from', 'FT1=2m', '--after', '1min', '--until', 'FT1=1m'],
      /one of --after/,
    ],
    [['predict', KNOWN, '--from', 'FT1=2m', '--until', 'BT2=0.1m'], /start level of BT2/],
    [['predict', KNOWN, '--from', 'FT1=2m', '--after', 'soon'], /--after takes a duration/],
    [['predict', KNOWN, '--from', 'XX=2m', '--after', '1min'], /no vessel has id "XX"/],
    [['predict', KNOWN, '--from', 'FT1=2', '--after', '1min'], /--from: "2" has no unit/],
    [['predict', KNOWN, '--from', 'FT1=9m', '--after', '1min'], /outside the vessel/],
    [['predict', KNOWN, '--from', 'FT1=1m', '--until', 'FT1=2m'], /below the start level/],
  ])('refuses bad input with exit 2 and one line: %j', (args, message) => {
    const r = efflux(args as string[]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(r.stderr).toMatch(message);
  });
});
