import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sha256Hex } from '../../server/sha256.js';
import {
  buildFitReport,
  buildOutletReport,
  reportJson,
  type FitReport,
} from '../../server/core/report/index.js';
import { renderFitReportPdf } from '../../server/render/fit-report-pdf.js';
import { renderOutletReportPdf } from '../../server/render/outlet-report-pdf.js';
import { readReportFile } from '../../server/render/report-file.js';
import { fitReportRecords, outletReportRecords } from '../../server/render/report-records.js';
import { havePoppler, pdfText } from './pdf-tools.js';
import { reportFixture, root, SOFTWARE, type Fixture } from './report-fixture.js';

const poppler = havePoppler();
const out = join(root, 'test-output');
const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

let fx: Fixture & { fitIds: number[] };
let report: FitReport;
let pdf: Buffer;

beforeAll(async () => {
  // two invented tests of the demo's backwash tank (sample-data/, fictional) a fortnight apart
  fx = await reportFixture([
    { log: 'fb1-2026-03-10-preamble.csv', testedAt: '2026-03-10T08:15:00Z' },
    { log: 'fb1-2026-03-26-leaking-inlet.csv', testedAt: '2026-03-26T08:15:00Z' },
  ]);
  report = buildFitReport(await fitReportRecords(fx.store, fx.fitId), SOFTWARE, sha256Hex);
  pdf = await renderFitReportPdf(report);
  mkdirSync(out, { recursive: true });
}, 60_000);
afterAll(() => fx?.store.close());

describe('fit report model', () => {
  it('carries the stored numbers, the raw file hash and the review', async () => {
    const stored = (await fx.store.fits.get(fx.fitId)).result as any;
    expect(report.results.dischargeCoefficient!.value).toBe(stored.dischargeCoefficient.value);
    expect(report.results.dischargeCoefficient!.expandedUncertainty).toBe(
      stored.dischargeCoefficient.expandedUncertainty,
    );
    expect(report.rawFiles[0].sha256).toBe(fx.logSha256);
    expect(report.review?.by).toBe('R. Penhallow (fictional)');
    expect(report.audit.some((a) => a.action === 'fit.approve')).toBe(true);
    expect(report.issuedAt).toBe(report.review!.at);
    // the same records give the same id
    expect(
      buildFitReport(await fitReportRecords(fx.store, fx.fitId), SOFTWARE, sha256Hex).reportId,
    ).toBe(report.reportId);
  });
});

describe('fit report PDF', () => {
  it('is byte-identical when rendered twice, and in another process', () => {
    return renderFitReportPdf(report).then((again) => {
      expect(sha(again)).toBe(sha(pdf));
      const json = join(out, 'report-child.json');
      writeFileSync(json, reportJson(report as any));
      const r = spawnSync(
        process.execPath,
        ['--import', 'tsx', join(root, 'test/render/render-child.ts'), json],
        { encoding: 'utf8', cwd: root },
      );
      expect(r.status, r.stderr).toBe(0);
      expect(r.stdout.trim()).toBe(sha(pdf));
    });
  }, 30_000);

  it('carries its id and content hash in the info dictionary and its JSON as an attachment', () => {
    const f = readReportFile(pdf, 'r.pdf');
    expect(f.kind).toBe('fit');
    expect(f.reportId).toBe(report.reportId);
    expect(f.contentSha256).toBe(report.contentSha256);
    expect(f.report).toEqual(JSON.parse(reportJson(report as any)));
  });

  it.skipIf(!poppler)(
    'holds Cd, its expanded uncertainty, the raw SHA-256 and the report id as text',
    () => {
      const file = join(out, 'fit-report.pdf');
      writeFileSync(file, pdf);
      const text = pdfText(file);
      const cd = report.results.dischargeCoefficient!;
      // shown to the resolution of u (two significant digits of u)
      const digits = 1 - Math.floor(Math.log10(cd.standardUncertainty!));
      expect(text).toContain(`discharge coefficient, Cd`);
      expect(text).toContain(cd.value.toFixed(digits));
      expect(text).toContain(String(+cd.expandedUncertainty!.toPrecision(2)));
      expect(text).toContain(fx.logSha256);
      expect(text).toContain(report.reportId);
      expect(text).toContain('ν_eff'); // glyphs outside WinAnsi come through the embedded font
      expect(text).toContain('m²');
      expect(text).toMatch(/page 1 of \d/);
      // an image of the first page for people to look at (test-output/ is git-ignored)
      const r = spawnSync('pdftoppm', [
        '-r',
        '80',
        '-png',
        '-f',
        '1',
        '-l',
        '1',
        file,
        join(out, 'fit-report-page'),
      ]);
      expect(r.status).toBe(0);
      expect(existsSync(join(out, 'fit-report-page-1.png'))).toBe(true);
    },
  );
});

describe('outlet history report', () => {
  it('trends the approved fits and renders deterministically with the threshold', async () => {
    const records = await outletReportRecords(fx.store, fx.outletId);
    expect(records.fits.map((f) => f.fitId)).toEqual(fx.fitIds);
    const r = buildOutletReport(records, SOFTWARE, sha256Hex);
    expect(r.asOf).toBe(
      new Date(Math.max(...records.fits.map((f) => Date.parse(f.review.at)))).toISOString(),
    );
    expect(r.trend.epochs[0].series.map((p) => p.fitId)).toEqual(fx.fitIds.map(String));
    expect(r.actionThresholdPct).toBe(-10); // the demo vessel names no threshold: the default
    const a = await renderOutletReportPdf(r);
    const b = await renderOutletReportPdf(
      buildOutletReport(await outletReportRecords(fx.store, fx.outletId), SOFTWARE, sha256Hex),
    );
    expect(sha(b)).toBe(sha(a));
    const file = join(out, 'outlet-report.pdf');
    writeFileSync(file, a);
    if (poppler) {
      const text = pdfText(file);
      expect(text).toContain(r.reportId);
      expect(text).toContain(r.trend.status.status);
      spawnSync('pdftoppm', [
        '-r',
        '80',
        '-png',
        '-f',
        '1',
        '-l',
        '1',
        file,
        join(out, 'outlet-report-page'),
      ]);
    }
  }, 30_000);
});
