/**
 * The CLI's text for people (issue 17 §4, issue 19 §3 and §5): aligned help, counts of what is
 * listed, ellipses, options that would be ignored refused with exit 2, plurals, --units, and the
 * comparison table after several logs. Demo files: the invented Kestrel Fen scenario (sample-data/).
 */
import { describe, expect, it } from 'vitest';
import { fleetText } from '../../server/cli/trend.js';
import type { FleetView } from '../../server/jobs/trend.js';
import { efflux } from './run-cli.js';

const FB1 = [
  'sample-data/fb1-2026-03-10-preamble.csv',
  'sample-data/fb1-2026-03-26-leaking-inlet.csv',
];
const VESSEL = ['--vessel', 'sample-data/backwash-tank-fb1.vessel.json'];

describe('efflux --help', () => {
  it('names and summaries in two aligned columns: no name runs into its summary', () => {
    const r = efflux(['--help']);
    expect(r.code).toBe(0);
    const rows = r.stdout.split('\n').filter((l) => /^ {2}\S/.test(l));
    expect(rows.length).toBeGreaterThan(15);
    const starts = rows.map((l) => /^ {2}\S+ {2,}/.exec(l)?.[0].length);
    expect(starts.every((s) => s !== undefined)).toBe(true);
    expect(new Set(starts).size).toBe(1); // one column for every summary
    expect(r.stdout).toMatch(/^ {2}fit-system {2,}fit connected vessels/m);
    expect(r.stdout).not.toMatch(/fit-systemfit/);
    // wrapped summaries continue under their own column
    for (const l of r.stdout.split('\n').filter((x) => /^ {4,}\S/.test(x)))
      expect(l.length - l.trimStart().length).toBe(starts[0]);
  }, 180_000);
});

describe('efflux fit: units and the comparison of several logs', () => {
  it('--units us prints Cd·a in in², flows in gal/min and heads in ft; --units si (default) in mm², L/s and m', () => {
    const us = efflux(['fit', FB1[0], ...VESSEL, '--units', 'us']);
    expect(us.code, us.stderr).toBe(0);
    expect(us.stdout).toMatch(/Cd·a {2}= \d\.\d+ ± \d\.\d+ in²/);
    expect(us.stdout).toMatch(/inflowM3S .* gal\/min/);
    expect(us.stdout).toMatch(/head \d+\.\d+ ft → /);
    const si = efflux(['fit', FB1[0], ...VESSEL]);
    expect(si.stdout).toMatch(/Cd·a {2}= \d{4}\.\d+ ± \d\.\d+ mm²/);
    expect(si.stdout).toMatch(/inflowM3S .* L\/s/);
    // no exponent in the headline, parameters or residuals (the budget table's strings are stored with the fit)
    expect(si.stdout.slice(0, si.stdout.indexOf('Uncertainty budget'))).not.toMatch(/\de-\d/);
    const bad = efflux(['fit', FB1[0], ...VESSEL, '--units', 'imperial']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--units must be si or us \(got "imperial"\)/);
  }, 180_000);

  it('several logs end with Cd·a, Cd ± U and each pair’s E_n, worked out here from the JSON', () => {
    const text = efflux(['fit', ...FB1, ...VESSEL]);
    expect(text.code, text.stderr).toBe(0);
    const json = efflux(['fit', ...FB1, ...VESSEL, '--json']);
    const lines = json.stdout.trim().split('\n');
    expect(lines).toHaveLength(2); // JSON stays JSON: one object per log, no table
    const [a, b] = lines.map((l) => JSON.parse(l));
    const table = text.stdout.slice(text.stdout.indexOf('Comparison of 2 tests'));
    expect(table).toContain('fb1-2026-03-10-preamble.csv');
    // E_n = (x₁ − x₂) / √(U₁² + U₂²) (ISO/IEC 17043:2010 Annex B, from memory)
    const en = (p: string) =>
      (a[p].value - b[p].value) / Math.hypot(a[p].expandedUncertainty, b[p].expandedUncertainty);
    const printed =
      /preamble\.csv − fb1-2026-03-26-leaking-inlet\.csv\s+(\S+) ± (\S+)\s+(\S+) \((agree|differ)\)\s+(\S+) ± (\S+)\s+(\S+) \((agree|differ)\)/.exec(
        table,
      );
    expect(printed, table).not.toBeNull();
    expect(Number(printed![3])).toBeCloseTo(en('effectiveAreaM2'), 2);
    expect(Number(printed![7])).toBeCloseTo(en('dischargeCoefficient'), 2);
    expect(printed![4]).toBe(Math.abs(en('effectiveAreaM2')) <= 1 ? 'agree' : 'differ');
    // the difference in mm²
    expect(Number(printed![1])).toBeCloseTo(
      (a.effectiveAreaM2.value - b.effectiveAreaM2.value) * 1e6,
      0,
    );
  }, 180_000);

  it('warnings counted in words: "N warnings", "1 warning", never "(s)"', () => {
    const r = efflux(['fit', FB1[1], ...VESSEL]);
    const j = JSON.parse(efflux(['fit', FB1[1], ...VESSEL, '--json']).stdout);
    const n = j.warnings.length;
    expect(n).toBeGreaterThan(1);
    expect(r.stdout).toMatch(new RegExp(`^${n} warnings$`, 'm'));
    expect(r.stdout).not.toMatch(/\w\(s\)/);
  }, 180_000);
});

describe('options that would be ignored are refused (exit 2, naming the option)', () => {
  it('--unit furlong when the header already says "level (m)"', () => {
    const r = efflux(['fit', FB1[0], ...VESSEL, '--unit', 'furlong']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /unit "furlong" was given but the header of column "level \(m\)" already says "m"/,
    );
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    // the same unit in another spelling is no conflict
    expect(efflux(['fit', FB1[0], ...VESSEL, '--unit', 'metres']).code).toBe(0);
  }, 180_000);
  it('efflux report: --units with --json or verify, --as-of with a fit report', () => {
    const j = efflux(['report', 'fit', '1', '--out', '/tmp/x.json', '--json', '--units', 'us']);
    expect(j.code).toBe(2);
    expect(j.stderr).toMatch(/--units has no effect with --json/);
    const v = efflux(['report', 'verify', 'nowhere.pdf', '--units', 'us']);
    expect(v.code).toBe(2);
    expect(v.stderr).toMatch(/--units has no effect on verify/);
    const a = efflux(['report', 'fit', '1', '--out', '/tmp/x.pdf', '--as-of', '2026-01-01']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/--as-of is for outlet reports/);
  }, 180_000);
});

describe('efflux trend --fleet text', () => {
  const item = (id: number, status: string, vesselName: string, site: string) =>
    ({
      outletId: id,
      outletKey: 'FD-2',
      vesselId: id,
      vesselName,
      site,
      retired: false,
      forecastStatus: null,
      status,
      reason: '',
      daysToThreshold: 3386,
      crossingAt: null,
    }) as unknown as FleetView['items'][number];
  const view: FleetView = {
    asOf: '2026-12-05',
    nowMs: Date.parse('2026-12-05'),
    recomputed: 0,
    counts: { ok: 7, watch: 2, act: 1 },
    items: [
      item(
        3,
        'watch',
        'Filter drain with a very long descriptive name',
        'Kestrel Fen water treatment works (fictional)',
      ),
      item(4, 'watch', 'FD-3', 'Kestrel Fen'),
    ],
  };
  it('counts what it lists after --status, with the whole fleet in brackets', () => {
    const text = fleetText(view, ['watch']);
    expect(text.split('\n')[0]).toBe(
      'fleet as of 2026-12-05: 2 outlets with status watch (of 10 in all); 2 watch',
    );
    expect(fleetText({ ...view, items: view.items.slice(0, 1) }, ['watch']).split('\n')[0]).toMatch(
      /: 1 outlet with status watch/,
    );
  }, 180_000);
  it('cuts long names with an ellipsis and says long times in years', () => {
    const text = fleetText(view, ['watch']);
    expect(text).toContain('Filter drain with a very long desc…');
    expect(text).toContain('Kestrel Fen water …');
    expect(text).toContain('9.3 years'); // 3386 days / 365.2425
  }, 180_000);
});
