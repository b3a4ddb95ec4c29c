/** The outlet-history report as PDF: status, the Cd·a trend with its band and threshold, the fits. */
import type { OutletReport } from '../core/report/index.js';
import { reportJson } from '../core/report/index.js';
import { dateTicks } from './chart-ticks.js';
import { domainOf, drawChart, type Layer } from './pdf-chart.js';
import { createReportDoc, finishReportDoc, MARGIN, type DocIdentity } from './pdf-doc.js';
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
  areaText,
  dateText,
  dayText as day,
  daysText,
  DEFAULT_UNIT_SYSTEM,
  metresText,
  millimetresText,
  numberIn,
  shownUnit,
  sig,
  toU,
  unitsNote,
  valueToU,
  type UnitSystem,
} from './report-format.js';

const BLUE = '#2f5d8a';
const RED = '#b8432f';

export function outletReportIdentity(
  r: OutletReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): DocIdentity {
  return {
    title: `Outlet history report — ${r.vessel.name}, outlet ${r.outlet.key}`,
    subject: `outlet ${r.outlet.id} of vessel ${r.vessel.id}, site ${r.vessel.site}, as of ${r.asOf}`,
    kind: 'outlet',
    reportId: r.reportId,
    contentSha256: r.contentSha256,
    dateIso: r.asOf,
    extra: {
      EffluxOutletId: String(r.outlet.id),
      EffluxAsOf: r.asOf,
      EffluxUnits: units,
      EffluxSoftware: `${r.software.name} ${r.software.version} ${r.software.gitCommit}`,
    },
    json: reportJson(r as unknown as Record<string, unknown>),
  };
}

export async function renderOutletReportPdf(
  r: OutletReport,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
  opts: RenderOptions = {},
): Promise<Buffer> {
  const id = outletReportIdentity(r, units);
  const area = shownUnit('m²', units);
  const doc = createReportDoc(id);
  doc.font('bold').fontSize(15).fillColor('#1f2a36').text('Outlet history report', MARGIN, doc.y);
  doc
    .font('regular')
    .fontSize(10)
    .text(`${r.vessel.name} · ${r.vessel.site} · outlet ${r.outlet.key}`);
  doc.moveDown(0.4);
  fields(
    doc,
    [
      ['report id', r.reportId],
      ['content SHA-256', r.contentSha256],
      ['as of', dateText(r.asOf)],
      ['units', unitsNote(units)],
    ],
    130,
    { monoValues: true },
  );
  const st = r.trend.status;
  heading(doc, 'Status');
  fields(doc, [
    ['status', st.status],
    ['why', st.reason],
    [
      'action threshold',
      `${sig(r.actionThresholdPct, 3)} % of the baseline Cd·a (${r.thresholdSource})`,
    ],
    [
      'latest change',
      st.latestChangePct === null
        ? '—'
        : `${sig(st.latestChangePct, 3)} % against the epoch baseline`,
    ],
    ['drift', st.slopePctPerYear === null ? '—' : `${sig(st.slopePctPerYear, 3)} % per year`],
    [
      'threshold forecast',
      st.crossingMs === null
        ? 'none'
        : `${day(st.crossingMs)} (in ${daysText(st.daysToThreshold)} from the as-of date)`,
    ],
    [
      'outlet',
      `${r.outlet.type ?? 'type not stated'}, bore ${millimetresText(r.outlet.boreM, units)}${r.outlet.boreToleranceM !== null ? ` ± ${millimetresText(r.outlet.boreToleranceM, units)}` : ''}, centreline ${metresText(r.outlet.elevationM, units)} above the vessel's datum`,
    ],
  ]);

  const layers: Layer[] = [];
  const allX: number[] = [];
  const allY: number[] = [];
  for (const ep of r.trend.epochs) {
    const b = ep.areaBand;
    if (b.length > 1) {
      layers.push({
        kind: 'band',
        xs: b.map((p) => p.atMs),
        lower: b.map((p) => p.lower * area.perSi),
        upper: b.map((p) => p.upper * area.perSi),
        color: BLUE,
      });
      layers.push({
        kind: 'line',
        xs: b.map((p) => p.atMs),
        ys: b.map((p) => p.value * area.perSi),
        color: BLUE,
        width: 0.9,
      });
      allX.push(b[0].atMs, b[b.length - 1].atMs);
      allY.push(...b.map((p) => p.lower * area.perSi), ...b.map((p) => p.upper * area.perSi));
    }
    const xs = ep.series.map((p) => p.testedAtMs);
    const ys = ep.series.map((p) => p.effectiveAreaM2 * area.perSi);
    layers.push({
      kind: 'points',
      xs,
      ys,
      errors: ep.series.map((p) => 2 * p.effectiveAreaU * area.perSi),
      color: '#1f2a36',
      radius: 2,
    });
    allX.push(...xs);
    allY.push(...ys);
    if (ep.thresholdM2 !== null) {
      const x1 = b.length ? b[b.length - 1].atMs : xs[xs.length - 1];
      layers.push({
        kind: 'hline',
        y: ep.thresholdM2 * area.perSi,
        x0: ep.series[0]?.testedAtMs ?? ep.startMs,
        x1,
        color: RED,
        dash: 3,
        label: `action threshold ${areaText(ep.thresholdM2, undefined, units)}`,
      });
      allY.push(ep.thresholdM2 * area.perSi);
    }
    if (ep.startedBy)
      layers.push({
        kind: 'vline',
        x: ep.startedBy.atMs,
        color: '#5b6670',
        dash: 2,
        label: ep.startedBy.kind,
      });
  }
  const xd = domainOf(allX);
  figure(doc, {
    title: 'Figure 1. Effective area Cd·a over time',
    caption:
      'Points: approved fits with bars of ±2 standard uncertainties (k = 2). Band: 95 % interval of the weighted trend line of the epoch (weights from each fit’s uncertainty). Dashed red: the action threshold. A maintenance event (dashed grey) starts a new epoch with a new baseline.',
    height: 170,
    draw: (frame) =>
      drawChart(doc, frame, {
        xDomain: xd,
        yDomain: domainOf(allY),
        xLabel: 'date of the drain test',
        yLabel: `Cd·a, ${area.symbol}`,
        xTicks: dateTicks(xd[0], xd[1], 7),
        layers,
        legend: [
          { label: 'approved fits ±2u', color: '#1f2a36' },
          { label: 'trend line, 95 % band', color: BLUE },
          { label: 'action threshold', color: RED },
        ],
      }),
  });

  heading(doc, 'Approved fits');
  table(
    doc,
    [
      { title: 'fit', width: 30 },
      { title: 'tested', width: 70 },
      { title: 'Cd', width: 55, align: 'right' },
      { title: 'u(Cd)', width: 45, align: 'right' },
      { title: 'U(Cd), k', width: 65, align: 'right' },
      { title: `Cd·a, ${area.symbol}`, width: 70, align: 'right' },
      { title: 'approved', width: 90 },
      { title: 'raw file SHA-256 (first 16)', width: 95, mono: true },
    ],
    r.fits.map((f) => [
      String(f.fitId),
      dateText(f.testedAt).slice(0, 10),
      toU(f.dischargeCoefficient, f.dischargeCoefficientU),
      sig(f.dischargeCoefficientU, 2),
      `${sig(f.dischargeCoefficientExpandedU, 2)}, ${sig(f.coverageFactor, 3)}`,
      valueToU(f.effectiveAreaM2, f.effectiveAreaU, 'm²', units),
      `${f.approvedBy ?? '—'}${f.selfReview ? ' (self-review)' : ''}, ${dateText(f.approvedAt).slice(0, 10)}`,
      f.logSha256.slice(0, 16),
    ]),
  );
  heading(doc, 'Epochs');
  table(
    doc,
    [
      { title: 'epoch', width: 40 },
      { title: 'started by', width: 120 },
      { title: 'fits', width: 35, align: 'right' },
      { title: 'slope, %/year', width: 90, align: 'right' },
      { title: `threshold, ${area.symbol}`, width: 80, align: 'right' },
      { title: 'forecast', width: 140 },
    ],
    r.trend.epochs.map((ep) => [
      String(ep.index),
      ep.startedBy ? `${ep.startedBy.kind} ${day(ep.startedBy.atMs)}` : 'first tests',
      String(ep.series.length),
      ep.area ? `${sig(ep.area.slopePctPerYear, 3)} ± ${sig(ep.area.slopePctPerYearU, 2)}` : '—',
      numberIn(ep.thresholdM2, 'm²', units, 4),
      ep.forecast ? ep.forecast.reason : '—',
    ]),
  );
  if (r.events.length) {
    heading(doc, 'Maintenance events');
    table(
      doc,
      [
        { title: 'when', width: 110 },
        { title: 'kind', width: 70 },
        { title: 'notes', width: 300 },
      ],
      r.events.map((e) => [dateText(e.occurredAt), e.kind, e.notes ?? '']),
    );
  }
  heading(doc, 'Software and scope');
  fields(doc, [
    ['software', `${r.software.name} ${r.software.version}, commit ${r.software.gitCommit}`],
    ['report format', `${r.format} v${r.formatVersion}`],
  ]);
  for (const line of r.statement) paragraph(doc, line, { size: 8 });
  paragraph(
    doc,
    'Each fit has its own report (efflux report fit <fitId>); check this document against the records with efflux report verify <this file>.',
    { size: 7.5, muted: true },
  );
  opts.layout?.push(...layoutRecord(doc));
  return finishReportDoc(doc, id);
}
