/**
 * The report of a stored joint fit of connected vessels: everything written out in words with
 * units (the PDF prints these strings; no JSON and no field names reach the reader), the per-log
 * curves for the charts, and the report's identity (SHA-256 of its canonical JSON, as the fit
 * report). Pure: the shell passes the stored record, the software record and the hash function.
 */
import type { JointFitResult } from '../fit-result/schema.js';
import { sig, toU } from '../analysis/format.js';
import { withIdentity, type Sha256Hex } from './identity.js';
import type { SoftwareRecord } from './records.js';

export const JOINT_FIT_REPORT_FORMAT = 'efflux-joint-fit-report';

/** The stored joint fit as the report reads it (store/joint-fits.ts StoredJointFit, minus bytes). */
export interface JointFitRecord {
  id: number;
  site: string;
  systemName: string;
  status: string;
  createdAt: string;
  createdBy: string | null;
  notes: string | null;
  settings: Record<string, unknown>;
  result: JointFitResult;
  drawing: unknown;
  files: { role: string; vessel: string; fileName: string; sha256: string; size: number }[];
  review: {
    decision: string;
    comment: string | null;
    by: string | null;
    at: string;
    selfReview: boolean;
  } | null;
}

export interface JointFitReportCurve {
  id: string;
  fileName: string;
  timeS: number[];
  levelM: number[];
  fittedM: number[];
}

export interface JointFitReport {
  format: typeof JOINT_FIT_REPORT_FORMAT;
  formatVersion: 1;
  reportId: string;
  contentSha256: string;
  /** The review time, else the fit's creation (never the clock). */
  issuedAt: string;
  software: SoftwareRecord;
  jointFitId: number;
  /** 'draft' | 'approved' | 'rejected': pages of a draft or rejected report are marked. */
  status: string;
  title: string;
  site: string;
  /** Label–value rows, already in words with units. */
  record: [string, string][];
  vessels: { id: string; name: string; rows: [string, string][] }[];
  inflows: string[];
  settings: [string, string][];
  /** Table: vessel, Cd·a, u, Cd, u, 95 % interval of Cd. */
  outlets: string[][];
  /** Table: log, vessel, readings, noise, lag-1 correlation, largest residual. */
  logs: string[][];
  correlations: { names: string[]; rows: string[][] };
  solver: [string, string][];
  warnings: string[];
  files: [string, string][];
  curves: JointFitReportCurve[];
}

const SHAPES: Record<string, (s: Record<string, number>) => string> = {
  'vertical-cylinder': (s) =>
    `upright cylinder, diameter ${m(s.diameterM)}${s.heightM ? `, height ${m(s.heightM)}` : ''}`,
  rectangular: (s) =>
    `rectangular, ${m(s.lengthM)} by ${m(s.widthM)} in plan${s.heightM ? `, height ${m(s.heightM)}` : ''}`,
  'horizontal-cylinder': (s) =>
    `cylinder lying on its side, diameter ${m(s.diameterM)}, length ${m(s.lengthM)}`,
  sphere: (s) => `sphere, diameter ${m(s.diameterM)}`,
  'cone-bottom': (s) =>
    `cylinder on a cone bottom, diameter ${m(s.diameterM)}, cone height ${m(s.coneHeightM)}${s.heightM ? `, height ${m(s.heightM)}` : ''}`,
  'elliptical-head-cylinder': (s) =>
    `upright cylinder with elliptical heads, diameter ${m(s.diameterM)}${s.heightM ? `, height ${m(s.heightM)}` : ''}`,
  table: () => 'plan area from a table of level against area',
};

const m = (x: number | undefined) => (x === undefined ? '—' : `${sig(x, 4)} m`);
const mm = (x: number | undefined) => (x === undefined ? '—' : `${sig(x * 1000, 4)} mm`);
const Ls = (x: number) => `${sig(x * 1000, 4)} L/s`;

const PARAMETER_WORDS: Record<string, string> = {
  effectiveAreaM2: 'Cd·a',
  initialReadingM: 'first reading',
  sensorZeroElevationM: 'sensor zero',
  leakInflowM3S: 'unknown inflow',
};

/** "WT4.effectiveAreaM2" → "WT4 Cd·a": the reader sees the vessel and the quantity. */
export function parameterWords(name: string): string {
  const dot = name.lastIndexOf('.');
  if (dot < 0) return name;
  const term = name.slice(dot + 1);
  return `${name.slice(0, dot)} ${PARAMETER_WORDS[term] ?? term.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase()}`;
}

function vesselRows(
  v: Record<string, unknown>,
  all: Record<string, unknown>[],
): [string, string][] {
  const shape = (v.shape ?? {}) as Record<string, number> & { kind?: string };
  const outlet = (v.outlet ?? {}) as Record<string, number | string>;
  const sensor = (v.sensor ?? {}) as Record<string, number>;
  const to = v.dischargesTo as string | null;
  const toName = to ? `${to} (${(all.find((x) => x.id === to)?.name as string) ?? to})` : null;
  const rows: [string, string][] = [
    ['shape', SHAPES[shape.kind ?? '']?.(shape) ?? 'as described in the system file'],
    [
      'outlet',
      `${outlet.type ? `${String(outlet.type)}, ` : ''}bore ${mm(outlet.boreM as number)}${outlet.boreToleranceM !== undefined ? ` ± ${mm(outlet.boreToleranceM as number)}` : ''}, centre ${m(outlet.elevationM as number)} above the vessel’s lowest point`,
    ],
    [
      'level sensor',
      sensor.zeroElevationM !== undefined
        ? `reads zero ${m(sensor.zeroElevationM)} above the vessel’s lowest point`
        : 'reads zero at the vessel’s lowest point',
    ],
    [
      'discharges',
      toName
        ? v.connection === 'submerged'
          ? `into ${toName}, outlet submerged (the head is the difference of the two surfaces)`
          : `into ${toName} as a free jet (its level does not act back)`
        : 'out of the system',
    ],
  ];
  if (typeof v.baseElevationM === 'number')
    rows.push(['lowest point', `${m(v.baseElevationM)} above the site datum`]);
  return rows;
}

function settingRows(s: Record<string, unknown>): [string, string][] {
  const rows: [string, string][] = [
    [
      'span fitted',
      typeof s.window === 'string' && s.window.trim()
        ? `${s.window.replace('..', ' s to ').trim()}${s.window.trim().endsWith('..') ? 'the end' : ' s'} from the logs’ common start`
        : 'the whole span all logs cover',
    ],
    ['sensor zero of each vessel', s.fitDatum ? 'fitted' : 'taken from the system file'],
    [
      'unknown constant inflow',
      s.fitInflow ? 'fitted for each vessel' : 'not fitted (taken as none)',
    ],
  ];
  if (s.unit) rows.push(['level unit (logs without one)', String(s.unit)]);
  if (s.tz) rows.push(['time zone of the logs', String(s.tz)]);
  if (s.dateOrder)
    rows.push([
      'date order',
      { dmy: 'day, month, year', mdy: 'month, day, year', ymd: 'year, month, day' }[
        s.dateOrder as 'dmy'
      ] ?? String(s.dateOrder),
    ]);
  if (s.delimiter)
    rows.push(['column separator', s.delimiter === '\t' ? 'tab' : `“${String(s.delimiter)}”`]);
  if (s.decimal) rows.push(['decimal mark', s.decimal === ',' ? 'comma' : 'point']);
  return rows;
}

export function buildJointFitReport(
  rec: JointFitRecord,
  software: SoftwareRecord,
  sha256Hex: Sha256Hex,
): JointFitReport {
  const r = rec.result;
  const system = (r as unknown as { system: Record<string, unknown> }).system;
  const vessels = (system.vessels ?? []) as Record<string, unknown>[];
  const diagnostics = (r as unknown as { diagnostics?: Record<string, unknown> }).diagnostics ?? {};
  const inflowLogs = (diagnostics.inflowLogs ?? []) as {
    to: string;
    file: string;
    samples: number;
    meanM3S?: number;
  }[];
  const inflows = ((system.inflows ?? []) as Record<string, unknown>[]).map((f) => {
    if ('constant' in f)
      return `${typeof f.constant === 'number' ? Ls(f.constant) : String(f.constant)} held constant into ${String(f.to)} during the test`;
    const used = inflowLogs.find((l) => l.to === f.to);
    return `logged by ${String(f.log)} into ${String(f.to)}${used ? `: ${used.samples} readings over the fitted span, flow taken as a straight line between readings${used.meanM3S !== undefined ? `, average ${Ls(used.meanM3S)}` : ''}` : ''}`;
  });
  const alignment = (diagnostics.alignment ?? {}) as { t0?: string | null; spanS?: number };
  const status = rec.status;
  const record: [string, string][] = [
    [
      'joint fit',
      `${rec.id}, ${status === 'draft' ? 'DRAFT (not reviewed)' : status.toUpperCase()}`,
    ],
    ['site', rec.site],
    ['stored', `${dateWords(rec.createdAt)} by ${rec.createdBy ?? 'the system'}`],
    [
      'review',
      rec.review
        ? `${rec.review.decision} by ${rec.review.by ?? '—'} on ${dateWords(rec.review.at)}${rec.review.selfReview ? ' (SELF-REVIEW: approved by the person who stored the fit; allowed for the site by an admin)' : ''}${rec.review.comment ? ` — “${rec.review.comment}”` : ''}`
        : 'not reviewed: a second person must approve it before it is relied on',
    ],
    [
      'fitted span',
      `${alignment.spanS !== undefined ? `${sig(alignment.spanS, 5)} s` : '—'}${alignment.t0 ? ` from ${dateWords(alignment.t0)}` : ''} (each log at its own sample times)`,
    ],
    ['engine', r.engineVersion],
  ];
  if (rec.notes) record.push(['notes', rec.notes]);
  const outlets = vessels.map((v) => {
    const id = String(v.id);
    const o = r.outlets[id];
    const cda = o?.effectiveAreaM2;
    const cd = o?.dischargeCoefficient ?? null;
    return [
      `${id} (${String(v.name ?? id)})`,
      cda ? `${toU(cda.value * 1e6, (cda.standardUncertainty ?? 0) * 1e6)} mm²` : '—',
      cda?.standardUncertainty != null ? `${sig(cda.standardUncertainty * 1e6, 2)} mm²` : '—',
      cd ? toU(cd.value, cd.standardUncertainty) : '—',
      cd?.standardUncertainty != null ? sig(cd.standardUncertainty, 2) : '—',
      cd?.ci95 && cd.ci95[0] !== null && cd.ci95[1] !== null
        ? `${toU(cd.ci95[0], cd.standardUncertainty)} to ${toU(cd.ci95[1], cd.standardUncertainty)}`
        : '—',
    ];
  });
  const logs = r.residuals.map((l) => [
    l.fileName,
    l.id,
    String(l.samples),
    l.rmseM !== null ? `${sig(l.rmseM * 1000, 3)} mm` : '—',
    l.lag1Autocorrelation !== null ? sig(l.lag1Autocorrelation, 2) : '—',
    l.maxAbsM !== null ? `${sig(l.maxAbsM * 1000, 3)} mm` : '—',
  ]);
  const names = r.correlations.parameters.map(parameterWords);
  const corr = r.correlations.matrix.map((row, i) => [
    names[i],
    ...row.map((x) => (x === null ? '—' : x.toFixed(3))),
  ]);
  const solver: [string, string][] = [
    ['converged', r.solver.converged ? 'yes' : 'NO'],
    ['why it stopped', r.solver.stopReason],
    ['iterations', String(r.solver.iterations)],
    ['degrees of freedom', sig(r.degreesOfFreedom, 4)],
    ['coverage factor k', `${sig(r.coverageFactor, 4)} (about 95 %)`],
    ['method', r.solver.method],
  ];
  if (typeof diagnostics.uncertaintyMethod === 'string')
    solver.push(['uncertainty', diagnostics.uncertaintyMethod]);
  const roleWords = (f: JointFitRecord['files'][number]) =>
    f.role === 'system'
      ? 'system file'
      : f.role === 'level'
        ? `level log of ${f.vessel}`
        : `inflow log into ${f.vessel}`;
  const files: [string, string][] = rec.files.flatMap((f) => [
    [roleWords(f), `${f.fileName}, ${f.size} bytes, kept exactly as received`],
    ['SHA-256', f.sha256],
  ]);
  const curves = (Array.isArray(rec.drawing) ? rec.drawing : []) as JointFitReportCurve[];
  const body = {
    format: JOINT_FIT_REPORT_FORMAT,
    formatVersion: 1 as const,
    issuedAt: rec.review?.at ?? rec.createdAt,
    software,
    jointFitId: rec.id,
    status,
    title: rec.systemName,
    site: rec.site,
    record,
    vessels: vessels.map((v) => ({
      id: String(v.id),
      name: String(v.name ?? v.id),
      rows: vesselRows(v, vessels),
    })),
    inflows,
    settings: settingRows(rec.settings),
    outlets,
    logs,
    correlations: { names, rows: corr },
    solver,
    warnings: r.warnings.map((w) => w.message),
    files,
    curves: curves.map((c) => ({
      id: c.id,
      fileName: c.fileName,
      timeS: c.timeS,
      levelM: c.levelM,
      fittedM: c.fittedM,
    })),
  };
  return withIdentity(body, sha256Hex) as JointFitReport;
}

function dateWords(iso: string): string {
  return iso.replace('T', ' ').replace(/\.\d+Z$|Z$/, ' UTC');
}
