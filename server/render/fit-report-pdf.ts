/** The fit report as PDF: result first, then the charts, then every record behind it. */
import type { FitReport, ReportQuantity } from '../core/report/index.js';
import { reportJson } from '../core/report/index.js';
import { domainOf, drawChart } from './pdf-chart.js';
import { createReportDoc, finishReportDoc, MARGIN, type Doc, type DocIdentity } from './pdf-doc.js';
import {
  fields,
  figure,
  heading,
  layoutRecord,
  paragraph,
  table,
  type RenderOptions,
} from './pdf-layout.js';
import {
  bytesText,
  dateText,
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  fixedText,
  metresText,
  millimetresText,
  numberIn,
  quantityText,
  resultText,
  shownUnit,
  sig,
  toU,
  uncertaintyIn,
  unitsNote,
  uText,
  valueToU,
  type UnitSystem,
} from './report-format.js';
import {
  fluidWords,
  geometryWords,
  parameterWords,
  plainNames,
  sensorWords,
  settingRows,
  settingsInline,
} from './report-words.js';
import { autocorrelationText } from '../core/budget/table.js';
import { actionLabel } from '../core/audit/action-labels.js';

const BLUE = '#2f5d8a';
const RED = '#b8432f';
const GREY = '#9aa1ab';

/** DRAFT, REJECTED or SUPERSEDED across every page of a fit report not in force. */
export function fitReportMark(r: FitReport): DocIdentity['mark'] {
  if (/superseded/.test(r.status))
    return { word: 'SUPERSEDED', meaning: 'a later fit of this test replaces this one' };
  if (r.status.startsWith('draft'))
    return {
      word: 'DRAFT',
      meaning: 'not reviewed; not for use until a second person approves it',
    };
  if (r.status.startsWith('rejected'))
    return { word: 'REJECTED', meaning: 'the reviewer refused this fit; kept for the record only' };
  return undefined;
}

export function fitReportIdentity(
  r: FitReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): DocIdentity {
  const mark = fitReportMark(r);
  return {
    ...(mark ? { mark } : {}),
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

function charts(doc: Doc, r: FitReport, units: UnitSystem): void {
  const { log, window: win } = r.plot;
  const wt = win.timeS.map((t) => t + win.offsetS);
  // minutes once the log is longer than ten minutes: ticks a reader can count
  const span = Math.max(...log.timeS, ...wt, 0) - Math.min(...log.timeS, ...wt, 0);
  const inMin = span > 600;
  const f = inMin ? 1 / 60 : 1;
  const unit = inMin ? 'min' : 's';
  const logT = log.timeS.map((t) => t * f);
  const winT = wt.map((t) => t * f);
  const xLabel = `time from the start of the log, ${unit}`;
  // levels in m (ft), residuals in mm (in): the reader's units (core/format)
  const level = displayUnit('length', units);
  const small = displayUnit('smallLength', units);
  const toLevel = (ys: number[]) => ys.map((y) => y * level.perSi);
  const logY = toLevel(log.levelM);
  const fittedY = toLevel(win.fittedM);
  const observedY = toLevel(win.observedM);
  figure(doc, {
    title: 'Figure 1. The log and the fitted drain',
    caption: `Grey: every reading of the log; dashed verticals: the drain window (${sig(r.window.startS * f, 4)} to ${sig(r.window.endS * f, 4)} ${unit}); blue points: the readings inside the window, drawn over the fitted model (red line).`,
    height: 150,
    draw: (frame) =>
      drawChart(doc, frame, {
        xDomain: domainOf(logT, winT),
        yDomain: domainOf(logY, fittedY),
        xLabel,
        yLabel: `reading, ${level.symbol}`,
        layers: [
          { kind: 'line', xs: logT, ys: logY, color: GREY, width: 0.7 },
          { kind: 'vline', x: r.window.startS * f, color: '#5b6670', dash: 2 },
          { kind: 'vline', x: r.window.endS * f, color: '#5b6670', dash: 2 },
          { kind: 'line', xs: winT, ys: fittedY, color: RED, width: 1.1 },
          { kind: 'points', xs: winT, ys: observedY, color: BLUE, radius: 0.55 },
        ],
        legend: [
          { label: 'whole log', color: GREY },
          { label: 'readings in the window', color: BLUE },
          { label: 'fitted model', color: RED },
        ],
      }),
  });
  const resid = win.observedM.map((o, i) => small.perSi * (o - win.fittedM[i]));
  figure(doc, {
    title: 'Figure 2. Residuals in the window',
    caption: `Residual = reading − fitted model, at the ${win.timeS.length} points drawn (the analysis thins long logs for drawing; the statistics below use all ${r.window.samples} samples). A pattern rather than scatter about zero means the model misses something.`,
    height: 100,
    draw: (frame) =>
      drawChart(doc, frame, {
        xDomain: domainOf(winT),
        yDomain: domainOf(resid, [0]),
        xLabel,
        yLabel: `residual, ${small.symbol}`,
        layers: [
          { kind: 'hline', y: 0, color: '#5b6670' },
          { kind: 'points', xs: winT, ys: resid, color: BLUE, radius: 0.7 },
        ],
      }),
  });
}

export async function renderFitReportPdf(
  r: FitReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
  opts: RenderOptions = {},
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
    fields(doc, quantityRows(r.results.dischargeCoefficient, units), 160);
  doc.moveDown(0.3);
  fields(doc, quantityRows(r.results.effectiveArea, units), 160);
  if (r.results.profileInterval95M2)
    fields(
      doc,
      [
        [
          'profile-likelihood interval',
          `${valueToU(r.results.profileInterval95M2[0], r.results.effectiveArea.standardUncertainty, 'm²', units)} … ${valueToU(r.results.profileInterval95M2[1], r.results.effectiveArea.standardUncertainty, 'm²', units)} ${shownUnit('m²', units).symbol}`,
        ],
      ],
      160,
    );
  const inflow = r.parameters.find((p) => p.unit === 'm³/s' && p.free);
  if (inflow)
    fields(
      doc,
      [
        [
          'inflow during the drain, Q_in',
          `${resultText(inflow.value, inflow.expandedUncertainty, 'm³/s', units)} (U, k = ${sig(inflow.coverageFactor, 3)}): a passing inlet or other constant inflow, fitted`,
        ],
      ],
      160,
    );
  fields(doc, [['solver converged', r.results.converged ? 'yes' : 'NO']], 160);
  if (r.review)
    fields(
      doc,
      [
        [
          r.review.decision === 'approved' ? 'approved by' : 'rejected by',
          `${r.review.by ?? '—'} on ${dateText(r.review.at)}${r.review.selfReview ? ' (SELF-REVIEW: approved by the person who uploaded the test or asked for this fit; allowed for the site by an admin)' : ''}${r.review.comment ? ` — “${r.review.comment}”` : ''}`,
        ],
      ],
      160,
    );
  else fields(doc, [['review', 'not reviewed (draft)']], 160);

  heading(doc, 'Vessel, outlet and test');
  fields(doc, [
    [
      'vessel',
      `${r.vessel.name} (id ${r.vessel.id}, vessel-file revision ${r.vessel.revision}), site ${r.vessel.site}`,
    ],
    ['geometry', geometryWords(r.vessel.shape, units)],
    ['sensor', sensorWords(r.vessel.sensor, units)],
    [
      'liquid',
      `${fluidWords(r.vessel.fluid)}; density used ${sig(r.vessel.fluidDensityKgM3, 6)} kg/m³ (${r.vessel.fluidDensitySource ?? 'source not stated'})`,
    ],
    ['gravity', `g = ${sig(r.vessel.gravityMS2, 6)} m/s²`],
    [
      'outlet',
      `${r.outlet.key ?? '—'} (${r.outlet.type ?? 'type not stated'}): bore d = ${millimetresText(r.outlet.boreM, units)}${r.outlet.boreToleranceM !== null ? ` ± ${millimetresText(r.outlet.boreToleranceM, units)}` : ''}, centreline ${metresText(r.outlet.elevationM, units)} above the datum, nominal area ${quantityText('area', r.outlet.nominalAreaM2, undefined, units, 5)}`,
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

  charts(doc, r, units);

  heading(doc, 'Reading');
  paragraph(doc, 'Settings given for this fit (anything not listed was detected from the log):', {
    size: 8,
  });
  fields(doc, settingRows(r.reading.settings), 150);
  fields(doc, [
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
  for (const n of r.reading.notes as { message?: string; code?: string }[])
    paragraph(doc, `• ${plainNames(n.message ?? String(n.code ?? 'note'))}`, { size: 7.8 });

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
  for (const n of wd.notes) paragraph(doc, `• ${plainNames(n.message)}`, { size: 7.8 });

  heading(doc, 'Model');
  paragraph(doc, r.model.equation, { mono: true });
  for (const s of r.model.inWords) paragraph(doc, `• ${s}`, { size: 8 });
  fields(doc, [
    ['free parameters', plainNames(r.model.freeParameters)],
    ['solution', plainNames(r.model.solution)],
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
      const [name, symbol] = parameterWords(p.name, p.symbol);
      const shown = shownUnit(p.unit, units);
      return [
        `${name} (${symbol})${p.atBound ? ' — at bound' : ''}`,
        p.free
          ? valueToU(p.value, p.standardUncertainty, p.unit, units)
          : `${valueToU(p.value, null, p.unit, units)} (fixed)`,
        uncertaintyIn(p.standardUncertainty, p.unit, units),
        sig(p.coverageFactor, 4),
        uncertaintyIn(p.expandedUncertainty, p.unit, units),
        p.interval95
          ? `${valueToU(p.interval95[0], p.standardUncertainty, p.unit, units)} … ${valueToU(p.interval95[1], p.standardUncertainty, p.unit, units)}`
          : '—',
        shown.symbol || '—',
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
        ...row.map((v) => fixedText(v, 4)),
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
        `${rs.samples ?? '—'} samples; RMSE ${millimetresText(rs.rmseM, units)}; largest |r| ${millimetresText(rs.maxAbsM, units)}; lag-1 autocorrelation ρ = ${sig(rs.lag1Autocorrelation, 3)}; Durbin–Watson ${sig(rs.durbinWatson, 3)}`,
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
    for (const n of r.budget.notes) paragraph(doc, `· ${plainNames(n)}`, { size: 7.5 });
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
      `Chosen: ${plainNames(String(cmp.chosen?.model ?? '—'))} (SSR ${sig(cmp.chosen?.sumSquares)} m², AIC ${sig(cmp.chosen?.aic, 6)}). ${plainNames(cmp.basis ?? '')}`,
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
        plainNames(`${row.change} ${row.term}: ${row.model}`),
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
        { title: `head from → to, ${displayUnit('length', units).symbol}`, width: 120 },
        { title: 'samples', width: 60, align: 'right' },
        { title: 'Cd', width: 80, align: 'right' },
        { title: 'u', width: 80, align: 'right' },
      ],
      r.headBands.map((b) => [
        `${numberIn(b.headFromM, 'm', units, 3)} → ${numberIn(b.headToM, 'm', units, 3)}`,
        String(b.samples),
        toU(b.dischargeCoefficient, b.standardUncertainty),
        uncertaintyIn(b.standardUncertainty, '1', units),
      ]),
    );
  }

  heading(doc, 'Solver record');
  const s = r.solver as Record<string, any>;
  fields(doc, [
    ['method', plainNames(String(s.method ?? '—'))],
    [
      'stop',
      `${String(s.stopReason ?? '—').replace(/-/g, ' ')} after ${s.iterations ?? '—'} iterations, ${s.evaluations ?? '—'} evaluations, ${s.jacobianEvaluations ?? '—'} Jacobians`,
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
      paragraph(doc, `! ${wn.stage ? `(${wn.stage}) ` : ''}${plainNames(wn.message)}`, { size: 8 });
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
      settingsInline(h.settings),
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
  opts.layout?.push(...layoutRecord(doc));
  return finishReportDoc(doc, id);
}
