import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { havePoppler, pdfText } from '../render/pdf-tools.js';
import { reportFixture } from '../render/report-fixture.js';
import { effluxWithData, efflux as cli, root } from './run-cli.js';

/**
 * The budget through the shells: the same table strings in the CLI text report and the PDF (the
 * fit page draws the same strings from the same JSON), and predictions from a single-vessel fit
 * (a JSON file or a stored fit id) against the closed-form drain time.
 */
const G = 9.80665; // standard gravity (CGPM 1901)
const cache = join(root, 'node_modules/.cache');
mkdirSync(cache, { recursive: true });
const LOG = 'sample-data/fb1-2026-03-10-preamble.csv';
const VESSEL = 'sample-data/backwash-tank-fb1.vessel.json';

const withData = effluxWithData;

let dataDir: string;
let fitId: number;
let fitJsonFile: string;
let fit: any;
beforeAll(async () => {
  const fx = await reportFixture([
    { log: 'fb1-2026-03-10-preamble.csv', testedAt: '2026-03-10T08:15:00Z' },
  ]);
  await fx.store.close();
  ({ dataDir, fitId } = fx);
  const r = cli(['fit', LOG, '--vessel', VESSEL, '--json']);
  fitJsonFile = join(cache, 'efflux-fb1-fit.json');
  writeFileSync(fitJsonFile, r.stdout);
  fit = JSON.parse(r.stdout);
}, 60_000);

describe('the budget in the reports', () => {
  it('the CLI text report prints the budget table of the JSON, row by row', () => {
    const text = cli(['fit', LOG, '--vessel', VESSEL]).stdout;
    expect(text).toMatch(/Uncertainty budget \(JCGM 100:2008\)/);
    for (const row of fit.budget.table.rows as string[][])
      for (const cell of row) expect(text).toContain(cell);
    for (const [, v] of fit.budget.table.totals as [string, string][]) expect(text).toContain(v);
    // the headline is the budget's combined uncertainty
    expect(fit.dischargeCoefficient.standardUncertainty).toBe(
      fit.budget.dischargeCoefficient.combinedStandardUncertainty,
    );
  }, 60_000);

  it('the PDF report of the same fit shows the same numbers', () => {
    if (!havePoppler()) return;
    const pdf = join(dataDir, 'budget.pdf');
    expect(withData(dataDir, ['report', 'fit', String(fitId), '--out', pdf]).code).toBe(0);
    const text = pdfText(pdf).replace(/\s+/g, ' ');
    expect(text).toContain('Uncertainty budget (JCGM 100:2008)');
    for (const row of fit.budget.table.rows as string[][]) {
      // value, u(x), sensitivity and contribution cells, as numbers
      for (const cell of [row[1], row[2], row[5], row[6]])
        expect(text).toContain(cell.split(' ')[0]);
    }
    expect(text).toContain(fit.budget.table.totals[0][1].split(';')[1].trim());
  }, 60_000);
});

describe('efflux predict from a single-vessel fit', () => {
  it('from the fit JSON: 3 m → 1 m within 0.1 % of the closed form, with a 95 % interval', () => {
    const r = cli(['predict', fitJsonFile, '--from', '3m', '--until', '1m', '--json']);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    // t = 2A(√H0 − √H1)/(Cd·a·√(2g)), H above the outlet (Torricelli, constant area; ordinary calculus)
    const A = (Math.PI * 3.2 ** 2) / 4;
    const exact =
      ((2 * A) / (fit.effectiveAreaM2.value * Math.sqrt(2 * G))) *
      (Math.sqrt(3 - 0.1) - Math.sqrt(1 - 0.1));
    expect(Math.abs(out.timeS.value - exact) / exact).toBeLessThan(1e-3);
    expect(out.timeS.standardUncertainty).toBeGreaterThan(0);
    expect(out.timeS.ci95[0]).toBeLessThan(out.timeS.value);
    expect(out.timeS.ci95[1]).toBeGreaterThan(out.timeS.value);
    const text = cli(['predict', fitJsonFile, '--from', '3m', '--until', '1m']);
    expect(text.stdout).toMatch(
      /falls from 3\.0000 m to 1\.0000 m in [\d.]+ s ± [\d.]+ s \(95 % [\d.]+ \.\. [\d.]+ s/,
    );
  }, 60_000);

  it('from a stored fit id, the same answer', () => {
    const r = withData(dataDir, [
      'predict',
      String(fitId),
      '--from',
      '3m',
      '--until',
      '1m',
      '--json',
    ]);
    expect(r.stderr).toBe('');
    const fromFile = JSON.parse(
      cli(['predict', fitJsonFile, '--from', '3m', '--until', '1m', '--json']).stdout,
    );
    expect(JSON.parse(r.stdout).timeS.value).toBeCloseTo(fromFile.timeS.value, 6);
  }, 60_000);

  it('to the outlet level is finite (the closed form with H1 = 0); below it is refused', () => {
    const out = JSON.parse(
      cli(['predict', fitJsonFile, '--from', '3m', '--until', '0.1m', '--json']).stdout,
    );
    const A = (Math.PI * 3.2 ** 2) / 4;
    const exact = ((2 * A) / (fit.effectiveAreaM2.value * Math.sqrt(2 * G))) * Math.sqrt(3 - 0.1);
    expect(Math.abs(out.timeS.value - exact) / exact).toBeLessThan(1e-6);
    const below = cli(['predict', fitJsonFile, '--from', '3m', '--until', '0.05m']);
    expect(below.code).toBe(2);
    expect(below.stderr).toMatch(/below the outlet \(centreline at 0\.1 m/);
  }, 60_000);

  it('--after and steady accept the fit too', () => {
    const after = JSON.parse(
      cli(['predict', fitJsonFile, '--from', '3m', '--after', '10min', '--json']).stdout,
    );
    // √H(t) = √H0 − (Cd·a·√(2g)/(2A))·t (Torricelli, constant area)
    const A = (Math.PI * 3.2 ** 2) / 4;
    const h =
      (Math.sqrt(2.9) - ((fit.effectiveAreaM2.value * Math.sqrt(2 * G)) / (2 * A)) * 600) ** 2 +
      0.1;
    expect(Math.abs(after.levelM.value - h)).toBeLessThan(1e-6);
    const steady = JSON.parse(cli(['steady', fitJsonFile, '--inflow', '2L/s', '--json']).stdout);
    const level = Object.values(steady.vessels)[0] as {
      levelM: { value: number; standardUncertainty: number };
    };
    // Cd·a·√(2g·H) = Q at equilibrium
    expect(level.levelM.value).toBeCloseTo(
      (0.002 / (fit.effectiveAreaM2.value * Math.sqrt(2 * G))) ** 2 + 0.1,
      6,
    );
    expect(level.levelM.standardUncertainty).toBeGreaterThan(0);
    // τ = 2·A·√H/(Cd·a·√(2g)) about the operating head (linearised Torricelli drain)
    const lin = JSON.parse(
      cli(['linearize', fitJsonFile, '--inflow', '2L/s', '--format', 'json']).stdout,
    );
    const H = (0.002 / (fit.effectiveAreaM2.value * Math.sqrt(2 * G))) ** 2;
    const tau = (2 * A * Math.sqrt(H)) / (fit.effectiveAreaM2.value * Math.sqrt(2 * G));
    expect(Math.abs(lin.timeConstantsS[0].value / tau - 1)).toBeLessThan(1e-6);
    expect(lin.timeConstantsS[0].standardUncertainty).toBeGreaterThan(0);
  }, 60_000);
});

describe('efflux predict on a system: the drain to the outlet level', () => {
  // the filter chain with every outlet's Cd stated (as test/cli/system-predict.test.ts does)
  const known = JSON.parse(
    readFileSync(join(root, 'sample-data/systems/filter-chain.system.json'), 'utf8'),
  );
  for (const v of known.vessels) v.dischargeCoefficient = 0.61;
  const file = join(cache, 'efflux-budget-known.system.json');
  writeFileSync(file, JSON.stringify(known));
  const ft1 = known.vessels[0];
  it('FT1 from 2.2 m to its outlet level: the closed form 2A·√H0/(Cd·a·√(2g)) within 0.1 %', () => {
    const r = cli([
      'predict',
      file,
      '--from',
      'FT1=2.2m',
      '--until',
      `FT1=${ft1.outlet.elevationM}m`,
      '--json',
    ]);
    expect(r.stderr).toBe('');
    const A = (Math.PI * ft1.shape.diameterM ** 2) / 4;
    const ca = (0.61 * Math.PI * ft1.outlet.boreM ** 2) / 4;
    const exact = ((2 * A) / (ca * Math.sqrt(2 * G))) * Math.sqrt(2.2 - ft1.outlet.elevationM);
    expect(Math.abs(JSON.parse(r.stdout).timeS.value - exact) / exact).toBeLessThan(1e-3);
  }, 60_000);
  it('a level below the outlet is refused, naming the outlet, and no inflow is blamed', () => {
    const r = cli(['predict', file, '--from', 'FT1=2.2m', '--until', 'FT1=0.05m']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/below FT1's outlet \(centreline at 0\.1 m above its bottom\)/);
    expect(r.stderr).not.toMatch(/inflow/);
  }, 60_000);
});

describe('the autocorrelation factor in words', () => {
  it('for ρ ≤ 0 says no inflation was applied, never (1+ρ)/(1−ρ)', async () => {
    const { autocorrelationText } = await import('../../server/core/budget/table.js');
    expect(autocorrelationText(-0.023, 1)).toMatch(/≤ 0.*no inflation applied, variance × 1/);
    expect(autocorrelationText(-0.023, 1)).not.toMatch(/\(1\+ρ\)/);
    expect(autocorrelationText(0.5, 3)).toBe('lag-1 ρ = 0.5: variance × 3 = (1+ρ)/(1−ρ)');
    const { textReport } = await import('../../server/core/analysis/text-report.js');
    const negative = {
      ...fit,
      uncertaintyMethod: {
        ...fit.uncertaintyMethod,
        lag1Autocorrelation: -0.04,
        varianceInflation: 1,
      },
    };
    const report = textReport(negative);
    expect(report).toMatch(
      /lag-1 ρ = -0\.04 ≤ 0 \(residuals not positively correlated\): no inflation applied/,
    );
    expect(report).not.toMatch(/\(1\+ρ\)\/\(1−ρ\)/);
  });
});
