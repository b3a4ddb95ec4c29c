/**
 * The report of a stored joint fit of connected vessels as PDF: the record and its review, the
 * outlets' Cd·a and Cd, every vessel and inflow in words with units, the settings as a labelled
 * list, one block per log (level chart, residual chart and caption kept on one page), the solver's
 * record and the files as received. A draft or rejected fit is marked on every page.
 */
import type { JointFitReport } from '../core/report/joint-fit-report.js';
import { reportJson } from '../core/report/index.js';
import { domainOf, drawChart } from './pdf-chart.js';
import { createReportDoc, finishReportDoc, MARGIN, type Doc, type DocIdentity } from './pdf-doc.js';
import { contentWidth, ensureRoom, fields, heading, paragraph, table } from './pdf-layout.js';

const BLUE = '#2f5d8a';
const RED = '#b8432f';

export function jointFitReportIdentity(r: JointFitReport): DocIdentity {
  return {
    title: `Connected-vessel fit report — ${r.title}`,
    subject: `joint fit ${r.jointFitId}, site ${r.site}`,
    kind: 'joint-fit',
    reportId: r.reportId,
    contentSha256: r.contentSha256,
    dateIso: r.issuedAt,
    extra: {
      EffluxJointFitId: String(r.jointFitId),
      EffluxSoftware: `${r.software.name} ${r.software.version} ${r.software.gitCommit}`,
    },
    json: reportJson(r as unknown as Record<string, unknown>),
  };
}

/** Height of one log's block: caption line, level chart, residual chart, note. */
const BLOCK_HEIGHT = 18 + 178 + 126 + 24;

function logBlock(doc: Doc, c: JointFitReport['curves'][number], index: number): void {
  ensureRoom(doc, BLOCK_HEIGHT);
  const w = contentWidth(doc) - 60;
  const x = MARGIN + 56;
  doc
    .font('bold')
    .fontSize(9.5)
    .fillColor('#1f2a36')
    .text(
      `Figure ${index + 1}. ${c.id}: level log ${c.fileName} and the joint model`,
      MARGIN,
      doc.y,
      {
        width: contentWidth(doc),
      },
    );
  const y0 = doc.y + 4;
  drawChart(
    doc,
    { x, y: y0, width: w, height: 150 },
    {
      xDomain: domainOf(c.timeS),
      yDomain: domainOf(c.levelM, c.fittedM),
      xLabel: 'time from the logs’ common start, s',
      yLabel: 'reading, m',
      layers: [
        // readings drawn over the curve, so they stay visible where the model fits them
        { kind: 'line', xs: c.timeS, ys: c.fittedM, color: RED, width: 1.1 },
        { kind: 'points', xs: c.timeS, ys: c.levelM, color: BLUE, radius: 0.6 },
      ],
      legend: [
        { label: 'readings', color: BLUE },
        { label: 'joint model', color: RED },
      ],
    },
  );
  const resid = c.levelM.map((o, i) => 1000 * (o - c.fittedM[i]));
  const y1 = y0 + 178;
  drawChart(
    doc,
    { x, y: y1, width: w, height: 100 },
    {
      xDomain: domainOf(c.timeS),
      yDomain: domainOf(resid, [0]),
      xLabel: 'time from the logs’ common start, s',
      yLabel: 'residual, mm',
      layers: [
        { kind: 'hline', y: 0, color: '#5b6670' },
        { kind: 'points', xs: c.timeS, ys: resid, color: BLUE, radius: 0.7 },
      ],
    },
  );
  doc.y = y1 + 126;
  paragraph(
    doc,
    `Residual = reading − joint model, at the ${c.timeS.length} points drawn (long logs are thinned for drawing; the fit used every reading).`,
    { muted: true, size: 7.5 },
  );
}

/** A wide mark across each page of a report that is not approved, and a line under the header. */
function markPages(doc: Doc, status: string): void {
  if (status === 'approved') return;
  const word = status === 'draft' ? 'DRAFT' : status.toUpperCase();
  const line =
    status === 'draft'
      ? 'DRAFT — not reviewed: a second person must approve this fit before it is relied on'
      : `${word} — this fit was ${status} on review and must not be relied on`;
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const { width, height } = doc.page;
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc.save();
    doc.rotate(-35, { origin: [width / 2, height / 2] });
    doc
      .font('bold')
      .fontSize(96)
      .fillColor('#b8432f')
      .fillOpacity(0.1)
      .text(word, 0, height / 2 - 50, { width, align: 'center', lineBreak: false });
    doc.restore();
    doc.save();
    doc
      .font('bold')
      .fontSize(8)
      .fillColor('#b8432f')
      .fillOpacity(1)
      .text(line, MARGIN, MARGIN - 2, { width: width - 2 * MARGIN, lineBreak: false });
    doc.restore();
    doc.page.margins.bottom = bottom;
  }
}

export async function renderJointFitReportPdf(r: JointFitReport): Promise<Buffer> {
  const id = jointFitReportIdentity(r);
  const doc = createReportDoc(id);
  doc.y += 8; // room for the status line under the header
  doc
    .font('bold')
    .fontSize(15)
    .fillColor('#1f2a36')
    .text('Connected-vessel fit report', MARGIN, doc.y);
  doc.font('regular').fontSize(10).text(`${r.title} · ${r.site}`);
  doc.moveDown(0.4);
  fields(
    doc,
    [
      ['report id', r.reportId],
      ['content SHA-256', r.contentSha256],
    ],
    130,
    { monoValues: true },
  );
  fields(doc, r.record, 130);

  heading(doc, 'Outlets: effective area Cd·a and discharge coefficient Cd');
  table(
    doc,
    [
      { title: 'vessel', width: 150 },
      { title: 'Cd·a', width: 90, align: 'right' },
      { title: 'u(Cd·a)', width: 60, align: 'right' },
      { title: 'Cd', width: 60, align: 'right' },
      { title: 'u(Cd)', width: 50, align: 'right' },
      { title: 'Cd, 95 % interval', width: 100, align: 'right' },
    ],
    r.outlets,
  );
  paragraph(
    doc,
    'u: standard uncertainty (JCGM 100:2008). Cd = Cd·a / (π d²/4) with the bore tolerance propagated; the interval uses the coverage factor below.',
    { muted: true, size: 7.5 },
  );

  heading(doc, 'Vessels');
  for (const v of r.vessels) {
    ensureRoom(doc, 70);
    doc.font('bold').fontSize(9).fillColor('#1f2a36').text(`${v.id} — ${v.name}`, MARGIN, doc.y);
    fields(doc, v.rows, 110);
    doc.moveDown(0.2);
  }
  heading(doc, 'Known inflows during the test');
  if (r.inflows.length) for (const f of r.inflows) paragraph(doc, f);
  else
    paragraph(
      doc,
      'none: the vessels drained with nothing flowing in (other than from each other)',
    );

  heading(doc, 'Settings of the fit');
  fields(doc, r.settings, 170);

  heading(doc, 'Each log and the joint model');
  r.curves.forEach((c, i) => logBlock(doc, c, i));

  heading(doc, 'Residuals per log');
  table(
    doc,
    [
      { title: 'log', width: 150 },
      { title: 'vessel', width: 60 },
      { title: 'readings', width: 60, align: 'right' },
      { title: 'noise (rms), mm', width: 80, align: 'right' },
      { title: 'lag-1 correlation', width: 80, align: 'right' },
      { title: 'largest, mm', width: 70, align: 'right' },
    ],
    r.logs,
  );

  heading(doc, 'Correlation of the fitted parameters');
  table(
    doc,
    [
      { title: 'parameter', width: 130 },
      ...r.correlations.names.map((n) => ({ title: n, width: 70, align: 'right' as const })),
    ],
    r.correlations.rows,
    7,
  );

  heading(doc, 'Solver');
  fields(doc, r.solver, 130);
  if (r.warnings.length) {
    heading(doc, 'Warnings');
    for (const w of r.warnings) paragraph(doc, w);
  }

  heading(doc, 'Files as received');
  fields(doc, r.files, 130);
  paragraph(
    doc,
    'Engineering estimate from efflux. Working at vessels (heights, confined spaces, contents, discharges) follows the site’s procedures, permits and local codes; check results against site data before relying on them.',
    { muted: true, size: 7.5 },
  );
  markPages(doc, r.status);
  return finishReportDoc(doc, id);
}
