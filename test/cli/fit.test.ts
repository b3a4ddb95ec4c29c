import { mkdtempSync, readFileSync, writeFileSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { efflux } from './run-cli.js';

const sd = (f: string) => join('sample-data', f);
const tmp = mkdtempSync(join(tmpdir(), 'efflux-cli-'));

describe('efflux fit', () => {
  it('prints a readable report with Cd, its interval, the window and the safety line', () => {
    const r = efflux([
      'fit',
      sd('fb1-2026-03-10-preamble.csv'),
      '--vessel',
      sd('backwash-tank-fb1.vessel.json'),
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Discharge coefficient\s+Cd\s+= 0\.61/);
    expect(r.stdout).toMatch(/95 % interval/);
    expect(r.stdout).toMatch(/Window/);
    expect(r.stdout).toMatch(/site procedures/);
  });

  it('--json prints one object with the documented fields, in SI', () => {
    const r = efflux([
      'fit',
      sd('fb1-2026-03-10-preamble.csv'),
      '--vessel',
      sd('backwash-tank-fb1.vessel.json'),
      '--json',
    ]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const k of ['dischargeCoefficient', 'effectiveAreaM2']) {
      expect(typeof j[k].value).toBe('number');
      expect(j[k].standardUncertainty).toBeGreaterThan(0);
      expect(j[k].ci95).toHaveLength(2);
    }
    expect(j.window).toMatchObject({
      startS: expect.any(Number),
      endS: expect.any(Number),
      samples: expect.any(Number),
    });
    expect(j.converged).toBe(true);
    expect(Array.isArray(j.warnings)).toBe(true);
    expect(j.timing).toMatchObject({ parseMs: expect.any(Number), fitMs: expect.any(Number) });
    expect(j.parameters.length).toBe(5);
    expect(j.correlations.parameters).toEqual(['effectiveAreaM2', 'initialReadingM']);
    expect(['relative-reduction', 'relative-step', 'gradient-orthogonal']).toContain(
      j.solver.stopReason,
    );
  });

  it('--plot writes an SVG picture of the log, window, fitted curve and residuals', () => {
    const svg = join(tmp, 'fit.svg');
    const r = efflux([
      'fit',
      sd('c2-2026-03-17-radar.csv'),
      '--vessel',
      sd('clearwell-c2.vessel.json'),
      '--plot',
      svg,
    ]);
    expect(r.code).toBe(0);
    const text = readFileSync(svg, 'utf8');
    expect(text.startsWith('<svg')).toBe(true);
    expect(text).toContain('fitted drain model');
    expect(text).toContain('residual (mm)');
  });

  it('several logs: progress on stderr, one JSON line each', () => {
    const r = efflux([
      'fit',
      sd('r3-2026-03-19-semicolon.csv'),
      sd('r3-2026-03-25-serial-days.csv'),
      '--vessel',
      sd('rinse-tank-r3.vessel.json'),
      '--json',
    ]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/\[1\/2\]/);
    expect(r.stderr).toMatch(/\[2\/2\]/);
    const lines = r.stdout
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(lines.map((l) => l.file)).toEqual([
      sd('r3-2026-03-19-semicolon.csv'),
      sd('r3-2026-03-25-serial-days.csv'),
    ]);
  });
});

describe('efflux fit on a fit that does not converge', () => {
  // 11 readings (130..140 s of the demo log, 1 % of the head) with every optional term free:
  // five parameters the data cannot separate, so the solver runs out of iterations.
  const args = [
    'fit',
    sd('fb1-2026-03-10-preamble.csv'),
    '--vessel',
    sd('backwash-tank-fb1.vessel.json'),
    '--window',
    '130..140',
    '--fit-inflow',
    '--fit-datum',
    '--fit-exponent',
  ];
  it('text: the first line says it did not converge, no Cd headline, exit 3', () => {
    const r = efflux(args);
    expect(r.code).toBe(3);
    const first = r.stdout.split('\n')[0];
    expect(first).toMatch(/^FIT DID NOT CONVERGE/);
    expect(first).toMatch(/do not use/);
    expect(r.stdout).toMatch(/Cd\s+= NOT CONVERGED/);
    expect(r.stdout).not.toMatch(/Cd\s+= \d/);
    expect(r.stderr).toMatch(/did not converge/);
  });
  it('--json keeps converged: false and exits 3', () => {
    const r = efflux([...args, '--json']);
    expect(r.code).toBe(3);
    const j = JSON.parse(r.stdout);
    expect(j.converged).toBe(false);
    expect(j.window.samples).toBe(11);
  });
});

describe('efflux fit refuses bad input with exit 2 and one line naming the problem', () => {
  const vessel = sd('backwash-tank-fb1.vessel.json');
  const write = (name: string, content: string | Uint8Array) => {
    const p = join(tmp, name);
    writeFileSync(p, content);
    return p;
  };
  const cases: [string, () => string[], RegExp][] = [
    ['no vessel file', () => ['fit', sd('fb1-2026-03-10-preamble.csv')], /--vessel/],
    ['a missing log file', () => ['fit', join(tmp, 'nope.csv'), '--vessel', vessel], /nope\.csv/],
    ['an empty file', () => ['fit', write('empty.csv', ''), '--vessel', vessel], /empty/i],
    [
      'header only',
      () => ['fit', write('header.csv', 'timestamp,level (m)\n'), '--vessel', vessel],
      /header/i,
    ],
    [
      'binary bytes',
      () => [
        'fit',
        write(
          'binary.csv',
          new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0, 0, 0, 13, 1, 2, 3, 0, 0, 255]),
        ),
        '--vessel',
        vessel,
      ],
      /binary|text/i,
    ],
    [
      'a single row',
      () => [
        'fit',
        write('one.csv', 'timestamp,level (m)\n2026-01-01T00:00:00Z,1.0\n'),
        '--vessel',
        vessel,
      ],
      /row|sample/i,
    ],
    [
      'no falling segment',
      () => [
        'fit',
        write(
          'flat.csv',
          'elapsed (s),level (m)\n' +
            Array.from(
              { length: 200 },
              (_, i) => `${i},${(1 + 0.002 * Math.sin(i)).toFixed(4)}`,
            ).join('\n') +
            '\n',
        ),
        '--vessel',
        vessel,
      ],
      /fall|drain/i,
    ],
    [
      'a vessel file with a negative field',
      () => [
        'fit',
        sd('fb1-2026-03-10-preamble.csv'),
        '--vessel',
        write(
          'neg.vessel.json',
          JSON.stringify({
            name: 'x',
            shape: { kind: 'vertical-cylinder', diameterM: -2 },
            outlet: { boreM: 0.05, elevationM: 0 },
            sensor: { zeroElevationM: 0 },
          }),
        ),
      ],
      /shape\.diameterM/,
    ],
    [
      'a vessel file with an unknown field',
      () => [
        'fit',
        sd('fb1-2026-03-10-preamble.csv'),
        '--vessel',
        write(
          'unk.vessel.json',
          JSON.stringify({
            name: 'x',
            colour: 'red',
            shape: { kind: 'vertical-cylinder', diameterM: 2 },
            outlet: { boreM: 0.05, elevationM: 0 },
            sensor: { zeroElevationM: 0 },
          }),
        ),
      ],
      /colour/,
    ],
    [
      'a vessel file with a missing field',
      () => [
        'fit',
        sd('fb1-2026-03-10-preamble.csv'),
        '--vessel',
        write(
          'miss.vessel.json',
          JSON.stringify({
            name: 'x',
            shape: { kind: 'vertical-cylinder', diameterM: 2 },
            sensor: { zeroElevationM: 0 },
          }),
        ),
      ],
      /outlet/,
    ],
    [
      'an unknown shape kind',
      () => [
        'fit',
        sd('fb1-2026-03-10-preamble.csv'),
        '--vessel',
        write(
          'kind.vessel.json',
          JSON.stringify({
            name: 'x',
            shape: { kind: 'torus', diameterM: 2 },
            outlet: { boreM: 0.05, elevationM: 0 },
            sensor: { zeroElevationM: 0 },
          }),
        ),
      ],
      /shape/,
    ],
    [
      'no sensor zero and no --fit-datum',
      () => [
        'fit',
        sd('fb1-2026-03-10-preamble.csv'),
        '--vessel',
        write(
          'nozero.vessel.json',
          JSON.stringify({
            name: 'x',
            shape: { kind: 'vertical-cylinder', diameterM: 3.2 },
            outlet: { boreM: 0.05, elevationM: 0.1 },
          }),
        ),
      ],
      /zeroElevationM.*--fit-datum/,
    ],
    [
      'an unknown option',
      () => ['fit', sd('fb1-2026-03-10-preamble.csv'), '--vessel', vessel, '--frobnicate'],
      /frobnicate/,
    ],
  ];
  for (const [name, args, message] of cases) {
    it(name, () => {
      const argv = args();
      const before = readdirSync(tmp).length;
      const r = efflux(argv);
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
      expect(r.stdout).toBe('');
      expect(readdirSync(tmp).length).toBe(before); // nothing half-written
    });
  }

  it('an oversized file is refused before it is read', () => {
    const big = join(tmp, 'big.csv');
    writeFileSync(big, Buffer.alloc(65 * 1024 * 1024, 0x31));
    const r = efflux(['fit', big, '--vessel', vessel]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/MiB/);
    expect(existsSync(big)).toBe(true);
  });
});

describe('efflux inspect', () => {
  it('explains columns, units, time format, candidates and the chosen window without fitting', () => {
    const r = efflux([
      'inspect',
      sd('ds1-2026-06-18-fill-hold-drain.tsv'),
      '--tz',
      'Europe/Lisbon',
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/columns:/);
    expect(r.stdout).toMatch(/level/);
    expect(r.stdout).toMatch(/drain candidates \(2\)/);
    expect(r.stdout).toMatch(/chosen window/);
    expect(r.stdout).not.toMatch(/Discharge coefficient/);
  });
  it('--json gives the same as data', () => {
    const r = efflux([
      'inspect',
      sd('h1-2026-03-13-epoch-kpa.csv'),
      '--vessel',
      sd('lime-hopper-h1.vessel.json'),
      '--json',
    ]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.columns.map((c: { role: string }) => c.role)).toContain('gauge-pressure');
    expect(j.window.samples).toBeGreaterThan(100);
  });
});
