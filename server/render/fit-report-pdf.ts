/** The fit report as PDF: result first, then the charts, then every record behind it. */
import type { FitReport, ReportQuantity } from '../core/report/index.js';
import { reportJson } from '../core/report/index.js';
import { domainOf, drawChart } from './pdf-chart.js';
import { createReportDoc, finishReportDoc, MARGIN, type Doc, type DocIdentity } from './pdf-doc.js';
import { contentWidth, ensureRoom, fields, heading, paragraph, table } from './pdf-layout.js';
import {
  bytesText,
  dateText,
  DEFAULT_UNIT_SYSTEM,
  resultText,
  shownUnit,
  sig,
  toU,
  unitsNote,
  uText,
  valueToU,
  type UnitSystem,
} from './report-format.js';
import { autocorrelationText } from '../core/budget/table.js';
import { actionLabel } from '../core/audit/action-labels.js';

const BLUE = '#2f5d8a';
const RED = '#b8432f';
const GREY = '#9aa1ab';

export function fitReportIdentity(
  r: FitReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): DocIdentity {
  return {
    title: `Drain-test fit report — ${r.vessel.name}${r.outlet.key ? `, outlet ${r.outlet.key}` : ''}`,
    subject: `fit ${r.fitId} of test ${r.test.id}, site ${r.vessel.site}`,
    kind: 'fit',
    reportId: r.reportId,
    contentSha256: r.contentSha256,
    dateIso: r.issuedAt,
    extra: {
      EffluxFitId: String(r.fitId),
      EffluxUnits: units,
      EffluxSoftware: `${r.software.name} ${r.software.version} ${r.software.gitCommit}`,
    },
    json: reportJson(r as unknown as Record<string, unknown>),
  };
}

/** ν_eff is capped by the engine when the Type B part dominates: show it as large, not as a number to trust. */
const dof = (v: number | null) =>
  v !== null && v >= 1e6 ? '> 10⁶ (treated as infinite)' : `= ${sig(v, 4)}`;

function quantityRows(q: ReportQuantity, units: UnitSystem): [string, string][] {
  const u = q.standardUncertainty;
  const { symbol } = shownUnit(q.unit, units);
  const unit = symbol ? ` ${symbol}` : '';
  return [
    // value ± U: the same string the CLI text report and the fit page print (core/format)
    [`${q.name}, ${q.symbol}`, resultText(q.value, q.expandedUncertainty, q.unit, units)],
    [
      'standard uncertainty u',
      `${uText(u, q.unit, units)}  (relative ${u !== null ? sig((100 * u) / Math.abs(q.value), 2) : '—'} %)`,
    ],
    [
      'coverage factor k',
      `${sig(q.coverageFactor, 4)}  (effective degrees of freedom ν_eff ${dof(q.effectiveDegreesOfFreedom)})`,
    ],
    [
      'expanded uncertainty U = k·u',
      `${uText(q.expandedUncertainty, q.unit, units)}  (coverage probability about 95 %)`,
    ],
    [
      'interval',
      q.interval95
        ? `${valueToU(q.interval95[0], u, q.unit, units)} … ${valueToU(q.interval95[1], u, q.unit, units)}${unit}`
        : '—',
    ],
  ];
}

function charts(doc: Doc, r: FitReport): void {
  const w = contentWidth(doc) - 60;
  const x = MARGIN + 56;
  const { log, window: win } = r.plot;
  const wt = win.timeS.map((t) => t + win.offsetS);
  ensureRoom(doc, 190);
  heading(doc, 'The log and the fitted drain');
  const y0 = doc.y + 4;
  drawChart(
    doc,
    { x, y: y0, width: w, height: 150 },
    {
      xDomain: domainOf(log.timeS, wt),
      yDomain: domainOf(log.levelM, win.fittedM),
      xLabel: 'time from the start of the log, s',
      yLabel: 'reading, m',
      layers: [
        { kind: 'line', xs: log.timeS, ys: log.levelM, color: GREY, width: 0.7 },
        { kind: 'vline', x: r.window.startS, color: '#5b6670', dash: 2 },
        { kind: 'vline', x: r.window.endS, color: '#5b6670', dash: 2 },
        { kind: 'line', xs: wt, ys: win.observedM, color: BLUE, width: 0.9 },
        { kind: 'line', xs: wt, ys: win.fittedM, color: RED, width: 1.1, dash: 3 },
      ],
      legend: [
        { label: 'whole log', color: GREY },
        { label: 'readings in the window', color: BLUE },
        { label: 'fitted model', color: RED },
      ],
    },
  );
  doc.y = y0 + 178;
  ensureRoom(doc, 150);
  const resid = win.observedM.map((o, i) => 1000 * (o - win.fittedM[i]));
  const y1 = doc.y;
  drawChart(
    doc,
    { x, y: y1, width: w, height: 100 },
    {
      xDomain: domainOf(wt),
      yDomain: domainOf(resid, [0]),
      xLabel: 'time from the start of the log, s',
      yLabel: 'residual, mm',
      layers: [
        { kind: 'hline', y: 0, color: '#5b6670' },
        { kind: 'points', xs: wt, ys: resid, color: BLUE, radius: 0.7 },
      ],
    },
  );
  doc.y = y1 + 126;
  paragraph(
    doc,
    `Residual = reading − fitted model, at the ${win.timeS.length} points drawn (the analysis thins long logs for drawing; statistics below use all ${r.window.samples} samples).`,
    { muted: true, size: 7.5 },
  );
}

export async function renderFitReportPdf(
  r: FitReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): Promise<Buffer> {
  const id = fitReportIdentity(r, units);
  const doc = createReportDoc(id);
  doc.font('bold').fontSize(15).fillColor('#1f2a36').text('Drain-test fit report', MARGIN, doc.y);
  doc
    .font('regular')
    .fontSize(10)
    .text(`${r.vessel.name} · ${r.vessel.site}${r.outlet.key ? ` · outlet ${r.outlet.key}` : ''}`);
  doc.moveDown(0.4);
  fields(
    doc,
    [
      ['report id', r.reportId],
      ['content SHA-256', r.contentSha256],
      ['fit', `${r.fitId} (${r.status}); issued ${dateText(r.issuedAt)}`],
      ['units', unitsNote(units)],
    ],
    130,
    { monoValues: true },
  );

  heading(doc, 'Result');
  if (r.results.dischargeCoefficient)
    fields(doc, quantityRows(r.results.dischargeCoefficient, units), 150);
  doc.moveDown(0.3);
  fields(doc, quantityRows(r.results.effectiveArea, units), 150);
  if (r.results.profileInterval95M2)
    fields(
      doc,
      [
        [
          'profile-likelihood interval',
          `${valueToU(r.results.profileInterval95M2[0], r.results.effectiveArea.standardUncertainty, 'm²', units)} … ${valueToU(r.results.profileInterval95M2[1], r.results.effectiveArea.standardUncertainty, 'm²', units)} ${shownUnit('m²', units).symbol}`,
        ],
      ],
      150,
    );
  fields(doc, [['solver converged', r.results.converged ? 'yes' : 'NO']], 150);
  if (r.review)
    fields(
      doc,
      [
        [
          r.review.decision === 'approved' ? 'approved by' : 'rejected by',
          `${r.review.by ?? '—'} on ${dateText(r.review.at)}${r.review.selfReview ? ' (SELF-REVIEW: approved by the person who uploaded the test or asked for this fit; allowed for the site by an admin)' : ''}${r.review.comment ? ` — “${r.review.comment}”` : ''}`,
        ],
      ],
      150,
    );
  else fields(doc, [['review', 'not reviewed (draft)']], 150);

  heading(doc, 'Vessel, outlet and test');
  const shape = r.vessel.shape as Record<string, unknown> | null;
  fields(doc, [
    [
      'vessel',
      `${r.vessel.name} (id ${r.vessel.id}, vessel-file revision ${r.vessel.revision}), site ${r.vessel.site}`,
    ],
    [
      'geometry',
      shape
        ? Object.entries(shape)
            .map(([k, v]) => `${k} ${typeof v === 'object' ? JSON.stringify(v) : v}`)
            .join(', ')
        : '—',
    ],
    ['sensor', r.vessel.sensor ? JSON.stringify(r.vessel.sensor) : '—'],
    [
      'fluid',
      `${r.vessel.fluid ? JSON.stringify(r.vessel.fluid) + '; ' : ''}density ${sig(r.vessel.fluidDensityKgM3, 6)} kg/m³ (${r.vessel.fluidDensitySource ?? '—'}); g = ${sig(r.vessel.gravityMS2, 6)} m/s²`,
    ],
    [
      'outlet',
      `${r.outlet.key ?? '—'} (${r.outlet.type ?? 'type not stated'}): bore d = ${sig(r.outlet.boreM)} m ± ${sig(r.outlet.boreToleranceM, 2)} m, centreline elevation ${sig(r.outlet.elevationM)} m, nominal area ${sig(r.outlet.nominalAreaM2)} m²`,
    ],
    [
      'test',
      `test ${r.test.id}, run ${dateText(r.test.testedAt)}; operator ${r.test.operator ?? '—'}; logger ${r.test.loggerId ?? '—'}`,
    ],
    ['uploaded', `${dateText(r.test.uploadedAt)} by ${r.test.uploadedBy ?? 'the system'}`],
    ['notes', r.test.notes ?? '—'],
  ]);
  heading(doc, 'Raw data as recorded');
  for (const f of r.rawFiles) {
    fields(doc, [
      [f.role, `${f.fileName}, ${f.size} bytes (${bytesText(f.size)}), kept exactly as received`],
    ]);
    fields(doc, [['SHA-256', f.sha256]], 130, { monoValues: true });
  }

  charts(doc, r);

  heading(doc, 'Reading');
  const settings = Object.entries(r.reading.settings);
  fields(doc, [
    [
      'settings given',
      settings.length
        ? settings.map(([k, v]) => `${k} = ${JSON.stringify(v)}`).join('; ')
        : 'none (everything detected)',
    ],
    [
      'first sample',
      `${dateText(r.reading.firstSampleAt)}; ${r.reading.samples ?? '—'} samples read`,
    ],
  ]);
  table(
    doc,
    [
      { title: 'column', width: 120 },
      { title: 'read as', width: 120 },
      { title: 'unit', width: 60 },
    ],
    r.reading.columns.map((c) => [c.header, c.role, c.unit ?? '—']),
  );
  for (const n of r.reading.notes as { message?: string }[])
    paragraph(doc, `• ${n.message ?? JSON.stringify(n)}`, { size: 7.8 });

  heading(doc, 'Drain window and what was left out');
  const wd = r.window;
  fields(doc, [
    [
      'window',
      `${sig(wd.startS, 6)} s … ${sig(wd.endS, 6)} s from the log's start (${dateText(wd.startTime)} … ${dateText(wd.endTime)}), chosen ${wd.chosenBy ?? '—'}`,
    ],
    [
      'samples',
      `${wd.samples} fitted of ${wd.samplesInRange ?? '—'} in the window; ${wd.excludedSamples ?? 0} left out`,
    ],
    [
      'spikes',
      wd.spikes.count
        ? `${wd.spikes.count} set aside, at lines ${wd.spikes.lines.slice(0, 40).join(', ')}${wd.spikes.count > 40 ? ', …' : ''}`
        : 'none found',
    ],
    [
      'flat lines',
      wd.flatLines.length
        ? wd.flatLines
            .map((f) => `${sig(f.startS, 6)}–${sig(f.endS, 6)} s (${f.samples}): ${f.reason}`)
            .join('; ')
        : 'none found',
    ],
    [
      'clipping',
      wd.clipping.length
        ? wd.clipping
            .map((f) => `${sig(f.startS, 6)}–${sig(f.endS, 6)} s (${f.samples}): ${f.reason}`)
            .join('; ')
        : 'none found',
    ],
  ]);
  if (wd.trims.length)
    table(
      doc,
      [
        { title: 'trimmed', width: 80 },
        { title: 'from … to, s', width: 90 },
        { title: 'reason', width: 330 },
      ],
      wd.trims.map((t) => [t.what, `${sig(t.fromS, 6)} … ${sig(t.toS, 6)}`, t.reason]),
    );
  for (const n of wd.notes) paragraph(doc, `• ${n.message}`, { size: 7.8 });

  heading(doc, 'Model');
  paragraph(doc, r.model.equation, { mono: true });
  for (const s of r.model.inWords) paragraph(doc, `• ${s}`, { size: 8 });
  fields(doc, [
    ['free parameters', r.model.freeParameters],
    ['solution', r.model.solution],
  ]);

  heading(doc, 'Parameters (JCGM 100:2008 terms)');
  table(
    doc,
    [
      { title: 'parameter', width: 120 },
      { title: 'value', width: 80, align: 'right' },
      { title: 'standard uncertainty u', width: 70, align: 'right' },
      { title: 'coverage factor k', width: 55, align: 'right' },
      { title: 'expanded uncertainty U', width: 70, align: 'right' },
      { title: '95 % interval', width: 110, align: 'right' },
      { title: 'unit', width: 30 },
    ],
    r.parameters.map((p) => {
      const shown = shownUnit(p.unit, units);
      return [
        `${p.name} (${p.symbol})${p.atBound ? ' — at bound' : ''}`,
        p.free
          ? valueToU(p.value, p.standardUncertainty, p.unit, units)
          : `${sig(p.value * shown.perSi, 6)} (fixed)`,
        uText(p.standardUncertainty, p.unit, units).replace(` ${shown.symbol}`, ''),
        sig(p.coverageFactor, 4),
        uText(p.expandedUncertainty, p.unit, units).replace(` ${shown.symbol}`, ''),
        p.interval95
          ? `${valueToU(p.interval95[0], p.standardUncertainty, p.unit, units)} … ${valueToU(p.interval95[1], p.standardUncertainty, p.unit, units)}`
          : '—',
        shown.symbol || p.unit,
      ];
    }),
  );
  if (r.correlations.parameters.length > 1) {
    paragraph(doc, 'Correlation matrix of the free parameters', { size: 8 });
    table(
      doc,
      [
        { title: '', width: 80 },
        ...r.correlations.parameters.map((p) => ({ title: p, width: 70, align: 'right' as const })),
      ],
      r.correlations.matrix.map((row, i) => [
        r.correlations.parameters[i],
        ...row.map((v) => (v === null ? '—' : v.toFixed(4))),
      ]),
    );
  }

  heading(doc, 'Residuals and the uncertainty method');
  const rs = r.residuals;
  fields(
    doc,
    [
      [
        'residuals',
        `${rs.samples ?? '—'} samples; RMSE ${sig(rs.rmseM, 3)} m; largest |r| ${sig(rs.maxAbsM, 3)} m; lag-1 autocorrelation ρ = ${sig(rs.lag1Autocorrelation, 3)}; Durbin–Watson ${sig(rs.durbinWatson, 3)}`,
      ],
      ['covariance', rs.covariance ?? '—'],
      [
        'autocorrelation correction',
        `${rs.correction ?? '—'}: ${autocorrelationText(rs.lag1Autocorrelation, rs.varianceInflation)}; ${sig(rs.effectiveSamples, 5)} effective samples, ν = ${sig(rs.degreesOfFreedom, 5)}`,
      ],
      ['bore', rs.boreUncertainty ?? '—'],
    ],
    150,
  );

  if (r.budget) {
    // the report model carries the budget's strings as stored (SI); say so when the rest is not
    heading(
      doc,
      `Uncertainty budget (JCGM 100:2008)${units === 'si' ? '' : ', in SI units as recorded'}`,
    );
    const widths = [130, 70, 70, 70, 80, 60, 45];
    table(
      doc,
      r.budget.columns.map((title, j) => ({
        title,
        width: widths[j] ?? 60,
        align: j === 0 || j === 3 ? undefined : ('right' as const),
      })),
      r.budget.rows,
    );
    fields(doc, r.budget.totals, 60);
    for (const n of r.budget.notes) paragraph(doc, `· ${n}`, { size: 7.5 });
  }

  const cmp = r.modelComparison as {
    basis?: string;
    chosen?: { model: string; sumSquares: number; aic: number };
    rows?: Record<string, any>[];
  } | null;
  if (cmp?.rows?.length) {
    heading(doc, 'Model comparison');
    paragraph(
      doc,
      `Chosen: ${cmp.chosen?.model} (SSR ${sig(cmp.chosen?.sumSquares)} m², AIC ${sig(cmp.chosen?.aic, 6)}). ${cmp.basis ?? ''}`,
      { size: 8 },
    );
    table(
      doc,
      [
        { title: 'alternative', width: 190 },
        { title: 'SSR, m²', width: 80, align: 'right' },
        { title: 'ΔAIC', width: 60, align: 'right' },
        { title: 'F', width: 60, align: 'right' },
        { title: 'p', width: 60, align: 'right' },
      ],
      cmp.rows.map((row) => [
        `${row.change} ${row.term}: ${row.model}`,
        sig(row.sumSquares),
        sig(row.deltaAic, 3),
        sig(row.fTest?.f, 3),
        sig(row.fTest?.pValue, 2),
      ]),
    );
  }
  if (r.headBands.length) {
    heading(doc, 'Cd by head band (a diagnostic, not the result)');
    table(
      doc,
      [
        { title: 'head from → to, m', width: 120 },
        { title: 'samples', width: 60, align: 'right' },
        { title: 'Cd', width: 80, align: 'right' },
        { title: 'u', width: 80, align: 'right' },
      ],
      r.headBands.map((b) => [
        `${sig(b.headFromM, 3)} → ${sig(b.headToM, 3)}`,
        String(b.samples),
        toU(b.dischargeCoefficient, b.standardUncertainty),
        sig(b.standardUncertainty, 2),
      ]),
    );
  }

  heading(doc, 'Solver record');
  const s = r.solver as Record<string, any>;
  fields(doc, [
    ['method', String(s.method ?? '—')],
    [
      'stop',
      `${s.stopReason ?? '—'} after ${s.iterations ?? '—'} iterations, ${s.evaluations ?? '—'} evaluations, ${s.jacobianEvaluations ?? '—'} Jacobians`,
    ],
    [
      'rank, singular values',
      `${s.rank ?? '—'}; ${(s.singularValues ?? []).map((v: number) => sig(v, 4)).join(', ')}`,
    ],
    ['sum of squares', `${sig(s.sumSquares, 6)} m²`],
  ]);

  heading(doc, 'Warnings');
  if (r.warnings.length)
    for (const wn of r.warnings)
      paragraph(doc, `! [${wn.stage ?? '—'}] ${wn.message}`, { size: 8 });
  else paragraph(doc, 'none', { size: 8 });

  heading(doc, 'Review and history');
  table(
    doc,
    [
      { title: 'fit', width: 40 },
      { title: 'created', width: 110 },
      { title: 'by', width: 70 },
      { title: 'status', width: 80 },
      { title: 'Cd', width: 60, align: 'right' },
      { title: 'settings', width: 140 },
    ],
    r.history.map((h) => [
      `${h.fitId}${h.thisFit ? ' (this)' : ''}`,
      dateText(h.createdAt),
      h.createdBy ?? 'system',
      `${h.status}${h.supersededBy !== null ? `, superseded by ${h.supersededBy}` : ''}`,
      sig(h.dischargeCoefficient, 5),
      JSON.stringify(h.settings),
    ]),
  );
  paragraph(
    doc,
    'Audit-log entries for this test and its fits (hashes of the chain; check with `efflux audit verify`):',
    { size: 8 },
  );
  table(
    doc,
    [
      { title: 'seq', width: 35, align: 'right' },
      { title: 'at', width: 100 },
      { title: 'who', width: 70 },
      { title: 'what happened', width: 95 },
      { title: 'entity', width: 50 },
      { title: 'entry hash', width: 165, mono: true },
    ],
    r.audit.map((a) => [
      String(a.seq),
      dateText(a.at),
      a.actor,
      actionLabel(a.action), // the code stays in the report JSON; the page prints words
      a.entity,
      a.hash,
    ]),
  );

  heading(doc, 'Software and scope');
  fields(doc, [
    ['software', `${r.software.name} ${r.software.version}, commit ${r.software.gitCommit}`],
    ['report format', `${r.format} v${r.formatVersion}`],
  ]);
  for (const line of r.statement) paragraph(doc, line, { size: 8 });
  paragraph(
    doc,
    `To check this document against the records: efflux report verify <this file>. The canonical JSON of the report is attached to the PDF as report.json; its SHA-256 without the two identity fields is the content hash above.`,
    { size: 7.5, muted: true },
  );
  return finishReportDoc(doc, id);
}
