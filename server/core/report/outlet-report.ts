/**
 * The outlet-history report model: every approved fit of one outlet, the maintenance events, and
 * the trend (server/core/trend) with its bands, threshold, forecast and status, as of a stated date.
 */
import { InputError } from '../errors.js';
import {
  outletTrend,
  type ApprovedFit,
  type MaintenanceEvent,
  type OutletTrend,
} from '../trend/index.js';
import { withIdentity, type Sha256Hex } from './identity.js';
import type { OutletReportRecords, SoftwareRecord } from './records.js';
import { REPORT_FORMAT_VERSION } from './fit-report.js';
import { SCOPE_STATEMENT } from './statement.js';

export const OUTLET_REPORT_FORMAT = 'efflux-outlet-report';

/** Used when the outlet names no action threshold: act at a 10 % loss of Cd·a (the project's default). */
export const DEFAULT_ACTION_THRESHOLD_PCT = -10;

export interface OutletReportFit {
  /** An approval by the uploader or refit requester (four eyes waived for the site); absent otherwise. */
  selfReview?: true;
  fitId: number;
  testId: number;
  testedAt: string;
  logFileName: string;
  logSha256: string;
  dischargeCoefficient: number | null;
  dischargeCoefficientU: number | null;
  coverageFactor: number | null;
  dischargeCoefficientExpandedU: number | null;
  effectiveAreaM2: number;
  effectiveAreaU: number;
  approvedBy: string | null;
  approvedAt: string;
}

export interface OutletReport {
  format: typeof OUTLET_REPORT_FORMAT;
  formatVersion: number;
  reportId: string;
  contentSha256: string;
  /** The trend is evaluated at this time: the latest approval or event on record, unless stated. */
  asOf: string;
  software: SoftwareRecord;
  vessel: { id: number; site: string; name: string; revision: number };
  outlet: {
    id: number;
    key: string;
    type: string | null;
    boreM: number | null;
    boreToleranceM: number | null;
    elevationM: number | null;
    actionThreshold: number | null;
  };
  actionThresholdPct: number;
  thresholdSource: string;
  fits: OutletReportFit[];
  events: { id: number; kind: string; occurredAt: string; notes: string | null }[];
  trend: OutletTrend;
  statement: string[];
}

const ms = (iso: string, field: string) => {
  const t = Date.parse(iso);
  if (!Number.isFinite(t)) throw new InputError(`not a time: "${iso}"`, { field });
  return t;
};

/** The latest time on record (approvals, events): the default "as of" of the report. */
export function latestRecordTime(records: OutletReportRecords): string | null {
  let best: string | null = null;
  let bestMs = -Infinity;
  for (const t of [
    ...records.fits.map((f) => f.review.at),
    ...records.events.map((e) => e.occurredAt),
  ]) {
    const m = Date.parse(t);
    if (m > bestMs) (bestMs = m), (best = t);
  }
  return best;
}

export function buildOutletReport(
  records: OutletReportRecords,
  software: SoftwareRecord,
  sha256Hex: Sha256Hex,
  asOf?: string,
): OutletReport {
  const { vessel, outlet } = records;
  if (records.fits.length === 0)
    throw new InputError(`outlet ${outlet.id} has no approved fits to report`, {
      field: 'outletId',
    });
  const at = asOf ?? latestRecordTime(records)!;
  const nowMs = ms(at, 'asOf');
  const fraction = outlet.actionThreshold;
  const usable = fraction !== null && fraction > 0 && fraction < 1;
  const pct = usable ? (fraction - 1) * 100 : DEFAULT_ACTION_THRESHOLD_PCT;
  const fits = records.fits
    .slice()
    .sort((a, b) => ms(a.testedAt, 'testedAt') - ms(b.testedAt, 'testedAt') || a.fitId - b.fitId)
    .map((f): OutletReportFit => {
      const r = f.result as Record<string, any>;
      const cd = r.dischargeCoefficient ?? null;
      return {
        fitId: f.fitId,
        testId: f.testId,
        testedAt: f.testedAt,
        logFileName: f.log.fileName,
        logSha256: f.log.sha256,
        dischargeCoefficient: cd?.value ?? null,
        dischargeCoefficientU: cd?.standardUncertainty ?? null,
        coverageFactor: cd?.coverageFactor ?? null,
        dischargeCoefficientExpandedU: cd?.expandedUncertainty ?? null,
        effectiveAreaM2: r.effectiveAreaM2.value,
        effectiveAreaU: r.effectiveAreaM2.standardUncertainty,
        approvedBy: f.review.by,
        approvedAt: f.review.at,
        ...(f.review.selfReview ? { selfReview: true as const } : {}),
      };
    });
  const trendFits: ApprovedFit[] = fits.map((f) => ({
    fitId: String(f.fitId),
    testedAtMs: ms(f.testedAt, 'testedAt'),
    effectiveAreaM2: f.effectiveAreaM2,
    effectiveAreaU: f.effectiveAreaU,
    dischargeCoefficient: f.dischargeCoefficient ?? NaN,
    dischargeCoefficientU: f.dischargeCoefficientU ?? NaN,
  }));
  const events = records.events
    .slice()
    .sort((a, b) => ms(a.occurredAt, 'occurredAt') - ms(b.occurredAt, 'occurredAt') || a.id - b.id);
  const trendEvents: MaintenanceEvent[] = events.map((e) => ({
    atMs: ms(e.occurredAt, 'occurredAt'),
    kind: e.kind,
    ...(e.notes ? { note: e.notes } : {}),
  }));
  const body = {
    format: OUTLET_REPORT_FORMAT,
    formatVersion: REPORT_FORMAT_VERSION,
    asOf: new Date(nowMs).toISOString(),
    software,
    vessel: { id: vessel.id, site: vessel.site, name: vessel.name, revision: vessel.revision },
    outlet: {
      id: outlet.id,
      key: outlet.key,
      type: outlet.type,
      boreM: outlet.boreM,
      boreToleranceM: outlet.boreToleranceM,
      elevationM: outlet.elevationM,
      actionThreshold: outlet.actionThreshold,
    },
    actionThresholdPct: pct,
    thresholdSource: usable
      ? `the outlet's action threshold, ${fraction} of the baseline Cd·a`
      : 'no usable threshold on the outlet: the default, a 10 % loss of the baseline Cd·a',
    fits,
    events: events.map((e) => ({
      id: e.id,
      kind: e.kind,
      occurredAt: e.occurredAt,
      notes: e.notes,
    })),
    trend: outletTrend(trendFits, trendEvents, { actionThresholdPct: pct }, nowMs),
    statement: [...SCOPE_STATEMENT],
  };
  return withIdentity(body, sha256Hex) as unknown as OutletReport;
}
