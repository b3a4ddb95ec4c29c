/**
 * The connected-vessel report of a three-vessel cascade with a submerged link and a constant
 * inflow (sample-data/systems/rinse-cascade, invented): the model in words with units, the PDF's
 * text checks (no JSON, no internal names, DRAFT on every page, each figure whole on its page) and
 * the identity (the same record gives the same report id; a review changes it).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { jointFitResult } from '../../server/core/fit-result/schema.js';
import {
  buildJointFitReport,
  parameterWords,
  type JointFitRecord,
} from '../../server/core/report/joint-fit-report.js';
import { systemFitAnswer } from '../../server/jobs/system-fit.js';
import { renderJointFitReportPdf } from '../../server/render/joint-fit-report-pdf.js';
import { sha256Hex } from '../../server/sha256.js';
import { jointReportProblems, pdfPages } from './joint-report-checks.js';
import { havePoppler } from './pdf-tools.js';
import { root, SOFTWARE } from './report-fixture.js';

const dir = join(root, 'sample-data/systems');
const file = (name: string) => ({
  fileName: name,
  bytes: new Uint8Array(readFileSync(join(dir, name))),
});
const poppler = havePoppler();
let record: JointFitRecord;

beforeAll(() => {
  const { drawing, ...result } = systemFitAnswer({
    system: file('rinse-cascade.system.json'),
    logs: [
      ['RC1', file('rc1-2026-04-08.csv')],
      ['RC2', file('rc2-2026-04-08.csv')],
      ['SW3', file('sw3-2026-04-08.csv')],
    ],
    flows: [],
    fields: { window: '0..900', fitDatum: true },
  });
  record = {
    id: 7,
    site: 'Kestrel Fen works (fictional)',
    systemName: 'Rinse cascade (fictional)',
    status: 'draft',
    createdAt: '2026-04-08T10:00:00.000Z',
    createdBy: 'Tech One (fictional)',
    notes: null,
    settings: { window: '0..900', fitDatum: true },
    result: jointFitResult.parse(result),
    drawing,
    files: [],
    review: null,
  };
}, 120_000);

describe('connected-vessel report', () => {
  it('says the model in words with units', () => {
    const r = buildJointFitReport(record, SOFTWARE, sha256Hex);
    const rows = Object.fromEntries(r.vessels.map((v) => [v.id, Object.fromEntries(v.rows)]));
    expect(rows.RC1.discharges).toMatch(/^into RC2 \(.+\), outlet submerged/);
    expect(rows.RC2.discharges).toMatch(/as a free jet/);
    expect(rows.SW3.discharges).toBe('out of the system');
    expect(r.inflows).toEqual(['0.5 L/s held constant into RC1 during the test']);
    expect(Object.fromEntries(r.settings)['span fitted']).toBe(
      '0 s to 900 s from the logs’ common start',
    );
    expect(Object.fromEntries(r.settings)['sensor zero of each vessel']).toBe('fitted');
    expect(parameterWords('RC1.sensorZeroElevationM')).toBe('RC1 sensor zero');
    expect(r.correlations.names).toContain('RC2 Cd·a');
  });

  it('has an identity from its content: the same record, the same id; a review, another', () => {
    const a = buildJointFitReport(record, SOFTWARE, sha256Hex);
    const b = buildJointFitReport(structuredClone(record), SOFTWARE, sha256Hex);
    expect(b.reportId).toBe(a.reportId);
    const reviewed = buildJointFitReport(
      {
        ...record,
        status: 'approved',
        review: {
          decision: 'approved',
          comment: null,
          by: 'Eng Two (fictional)',
          at: '2026-04-09T08:00:00.000Z',
          selfReview: false,
        },
      },
      SOFTWARE,
      sha256Hex,
    );
    expect(reviewed.reportId).not.toBe(a.reportId);
    expect(reviewed.issuedAt).toBe('2026-04-09T08:00:00.000Z');
  });

  it('renders a PDF that passes the text checks, three figures each whole on its page', async () => {
    const pdf = await renderJointFitReportPdf(buildJointFitReport(record, SOFTWARE, sha256Hex));
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    if (!poppler) return;
    const pages = pdfPages(pdf);
    expect(jointReportProblems(pages, { status: 'draft', figures: 3 })).toEqual([]);
    const text = pages.join('\n');
    expect(text).toMatch(/outlet submerged/);
    expect(text).toMatch(/0\.5 L\/s held constant into RC1/);
  });
});
