/**
 * The demo's reports read as written for a person (issue 17): the invented Kestrel Fen demo
 * (sample-data/, fictional) loaded the service's way; a fit PDF for each of the demo's single tests
 * (drafts), a monthly history fit (approved), a rejected one and a superseded one, and the outlet
 * PDFs of the three histories. Each is checked in its pdftotext text (no JSON, no internal names
 * from the schemas, the status on every page) and in its page positions (figures with their
 * captions, table headers with rows), and each is compared with the layout helper's own record.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { loadDemo } from '../../server/jobs/demo.js';
import { refit } from '../../server/jobs/ingest.js';
import { renderFitReportPdf } from '../../server/render/fit-report-pdf.js';
import { renderOutletReportPdf } from '../../server/render/outlet-report-pdf.js';
import type { LayoutEntry } from '../../server/render/pdf-layout.js';
import { fitReport, outletReport } from '../../server/render/report-service.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { openTestStore } from '../support/store.js';
import { actorOf } from '../../server/store/users.js';
import { havePoppler, pdfText } from './pdf-tools.js';
import { internalNames, layoutProblems, pdfPages, reportTextProblems } from './pdf-text.js';
import { root, SOFTWARE } from './report-fixture.js';

const poppler = havePoppler();
const out = join(root, 'test-output', 'reader');
const analyze = async (q: Parameters<typeof analyzeDrainTest>[0]) => analyzeDrainTest(q);

let store: Store;
const fitOf: Record<string, number> = {};
let parameterNames: string[] = [];

beforeAll(async () => {
  store = await openTestStore();
  const loaded = await loadDemo(store, analyze, join(root, 'sample-data/manifest.json'));
  expect(loaded.skipped).toEqual([]);
  const engineer = await store.users.createToken(
    SYSTEM_ACTOR,
    'R. Penhallow (fictional)',
    'engineer',
  );
  for (let id = 1; ; id++) {
    let fit: Awaited<ReturnType<Store['fits']['get']>>;
    try {
      fit = await store.fits.get(id);
    } catch {
      break;
    }
    fitOf[(await store.tests.get(fit.testId)).fileName] = id;
  }
  await store.fits.review(
    actorOf(engineer.user),
    fitOf['r3-2026-03-19-semicolon.csv'],
    'rejected',
    'Window too short for this outlet (demo).',
  );
  // a draft refitted is superseded at once
  await refit(store, analyze, SYSTEM_ACTOR, fitOf['fb1-2026-03-10-preamble.csv'], {
    fitExponent: true,
  });
  const names = new Set<string>();
  for (const id of Object.values(fitOf))
    for (const p of ((await store.fits.get(id)).result as { parameters: { name: string }[] })
      .parameters)
      names.add(p.name);
  parameterNames = [...names];
  mkdirSync(out, { recursive: true });
}, 120_000);
afterAll(async () => {
  await store?.close();
});

interface Rendered {
  file: string;
  layout: LayoutEntry[];
}

async function renderFit(fileName: string): Promise<Rendered> {
  const layout: LayoutEntry[] = [];
  const pdf = await renderFitReportPdf(await fitReport(store, fitOf[fileName], SOFTWARE), 'si', {
    layout,
  });
  const file = join(out, `fit-${fileName.replace(/[^\w.-]/g, '_')}.pdf`);
  writeFileSync(file, pdf);
  return { file, layout };
}

function expectReadable(r: Rendered, mark?: string) {
  const pages = pdfPages(r.file);
  expect(pages.length).toBeGreaterThan(0);
  const names = internalNames(parameterNames);
  expect(reportTextProblems(pages, { names, mark }), r.file).toEqual([]);
  expect(layoutProblems(pages, r.layout), r.file).toEqual([]);
  // the record covers the figures and the tables (not vacuous)
  expect(r.layout.some((e) => e.kind === 'figure')).toBe(true);
  expect(r.layout.some((e) => e.kind === 'table-header')).toBe(true);
  return pages;
}

describe.skipIf(!poppler)('demo reports written for a reader', () => {
  it('the names to look for come from the schemas (vessel file, settings, fit result)', () => {
    const names = internalNames(parameterNames);
    for (const n of ['zeroElevationM', 'diameterM', 'fitInflow', 'effectiveAreaM2', 'stopReason'])
      expect(names).toContain(n);
    expect(names).toContain('sensorZeroElevationM'); // a parameter name of the stored fits
    expect(names).not.toContain('converged'); // plain words are not internal names
  });

  it('the check itself finds JSON, internal names, a missing mark and a split figure', () => {
    const page = (text: string) => ({
      width: 595,
      height: 842,
      text,
      lines: text.split('\n').map((t, i) => ({
        text: t,
        xMin: 50,
        xMax: 300,
        yMin: 100 + 12 * i,
        yMax: 109 + 12 * i,
      })),
    });
    const bad = [page('sensor {"zeroElevationM":0.1}'), page('settings fitInflow = false')];
    const found = reportTextProblems(bad, { names: internalNames(), mark: 'DRAFT' }).map(
      (p) => p.what,
    );
    expect(found).toContain('JSON text ({")');
    expect(found).toContain('internal name "zeroElevationM"');
    expect(found).toContain('internal name "fitInflow"');
    expect(found.filter((w) => w === 'no DRAFT mark')).toHaveLength(2);
    const split = layoutProblems(
      [page('Figure 1. The log\n3.5\n3.0'), page('Grey: every reading')],
      [
        {
          kind: 'figure',
          page: 0,
          top: 95,
          bottom: 140,
          title: 'Figure 1. The log',
          caption: 'Grey: every reading',
        },
        { kind: 'table-header', page: 1, top: 100, bottom: 110, title: 'Grey:', rowsBelow: [] },
      ],
    );
    expect(split).toContain('figure "Figure 1. The log": caption not found on page 1');
    expect(split.some((s) => /table header "Grey:" on page 2 has 0 row/.test(s))).toBe(true);
  });

  it('a draft of each demo test: inputs in words, DRAFT on every page, charts with captions', async () => {
    const drafts = Object.keys(fitOf).filter((f) => !/^fd\d-/.test(f));
    expect(drafts.length).toBeGreaterThanOrEqual(9);
    for (const f of drafts) {
      if (f === 'r3-2026-03-19-semicolon.csv' || f === 'fb1-2026-03-10-preamble.csv') continue;
      const r = await renderFit(f);
      expectReadable(r, 'DRAFT');
      if (f === 'fb1-2026-03-26-leaking-inlet.csv') {
        const text = pdfText(r.file); // with the page's layout: a label and its value on one line
        // the vessel file in words (sample-data/backwash-tank-fb1.vessel.json)
        expect(text).toContain('Vertical cylinder, diameter 3.200 m, height 4.000 m');
        expect(text).toMatch(/Sensor zero 0\.100 m above the vessel's datum/);
        expect(text).toContain('water at 12 °C');
        expect(text).toContain('bore d = 50.0 mm ± 0.2 mm');
        // the passing inlet's flow in L/s, and the settings as a list
        // value ± U as the result rows print it (core/format), in the SI report's L/s
        expect(text).toMatch(/inflow during the drain, Q_in\s+\d\.\d+ ± \d\.\d+ L\/s \(U, k = /);
        expect(text).toMatch(/constant inflow\s+fitted/);
        expect(text).toContain('Uncertainty budget (JCGM 100:2008)');
        expect(text).not.toMatch(/\d\.\d+e-\d+ m³\/s/);
      }
    }
  }, 120_000);

  it('a rejected fit says REJECTED and a superseded one SUPERSEDED on every page', async () => {
    expectReadable(await renderFit('r3-2026-03-19-semicolon.csv'), 'REJECTED');
    expectReadable(await renderFit('fb1-2026-03-10-preamble.csv'), 'SUPERSEDED');
  }, 60_000);

  it('an approved monthly fit carries no status mark', async () => {
    const r = await renderFit('fd2-2025-06-08.csv');
    const pages = expectReadable(r);
    for (const w of ['DRAFT', 'REJECTED', 'SUPERSEDED'])
      expect(pages.some((p) => new RegExp(`\\b${w}\\b`).test(p.text))).toBe(false);
  }, 60_000);

  it('the outlet histories: Cd·a in mm², dates on calendar steps, figure with caption', async () => {
    for (const prefix of ['fd1', 'fd2', 'fd3']) {
      const anyFit = Object.keys(fitOf).find((f) => f.startsWith(`${prefix}-`))!;
      const test = await store.tests.get((await store.fits.get(fitOf[anyFit])).testId);
      const layout: LayoutEntry[] = [];
      const pdf = await renderOutletReportPdf(
        await outletReport(store, test.outletId!, SOFTWARE),
        'si',
        { layout },
      );
      const file = join(out, `outlet-${prefix}.pdf`);
      writeFileSync(file, pdf);
      const pages = expectReadable({ file, layout });
      const text = pages.map((p) => p.text).join('\n');
      expect(text).toContain('Cd·a, mm²');
      expect(text).not.toMatch(/\de-\d/); // no exponent notation anywhere
      // the date axis: labels on one baseline, each the first of a month (YYYY-MM), evenly stepped
      const ticks = pages
        .flatMap((p) => p.lines)
        .filter((l) => /^\d{4}-\d{2}$/.test(l.text))
        .sort((a, b) => a.xMin - b.xMin);
      expect(ticks.length).toBeGreaterThanOrEqual(3);
      expect(new Set(ticks.map((t) => Math.round(t.yMin))).size).toBe(1);
      const months = ticks.map((t) => +t.text.slice(0, 4) * 12 + +t.text.slice(5, 7));
      const steps = new Set(months.slice(1).map((m, i) => m - months[i]));
      expect(steps.size, ticks.map((t) => t.text).join(' ')).toBe(1);
    }
  }, 120_000);
});
