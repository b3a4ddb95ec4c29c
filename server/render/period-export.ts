/**
 * A period export: every approved (current) fit chosen by site, vessel and test date, as one zip
 * of the fit reports in PDF, a CSV summary, the audit-log excerpt for those tests and fits, and a
 * manifest of SHA-256 hashes (manifest.json and SHA256SUMS for `sha256sum -c`). Deterministic:
 * the zip's timestamps are the latest approval time among the fits.
 */
import { InputError } from '../core/errors.js';
import type { FitReport, SoftwareRecord } from '../core/report/index.js';
import type { AuditEntry } from '../store/audit.js';
import type { Store } from '../store/index.js';
import type { StoredFit } from '../store/fits.js';
import type { Vessel } from '../store/vessels.js';
import { renderFitReportPdf } from './fit-report-pdf.js';
import { allFitsOfVessel, countsInHistory } from './report-records.js';
import { fitReport } from './report-service.js';
import { csvText } from '../core/report/csv.js';
import { assembleExport, type ExportAssembly } from './period-export-assembly.js';
import type { ZipEntry } from './zip.js';

export interface ExportSelection {
  site?: string;
  /** Any of these sites (the CLI's --site, matched on part of a name). */
  sites?: readonly string[];
  /** A vessel id or name. */
  vessel?: string;
  /** YYYY-MM-DD or an ISO time; test dates from (inclusive). */
  from?: string;
  /** YYYY-MM-DD (the whole day counts) or an ISO time; test dates up to. */
  to?: string;
}

const DAY = 86_400_000;

function bound(s: string | undefined, field: string, endOfDay: boolean): number | null {
  if (s === undefined) return null;
  const dateOnly = /^\d{4}-\d{2}-\d{2}$/.test(s);
  const ms = Date.parse(dateOnly ? `${s}T00:00:00Z` : s);
  if (!Number.isFinite(ms))
    throw new InputError(`"${s}" is not a date (YYYY-MM-DD or ISO time)`, { field });
  return dateOnly && endOfDay ? ms + DAY : ms;
}

async function allVessels(store: Store): Promise<Vessel[]> {
  const out: Vessel[] = [];
  for (let offset = 0; ; offset += 500) {
    const page = await store.vessels.list(500, offset);
    out.push(...page.items);
    if (out.length >= page.total || page.items.length === 0) return out;
  }
}

export async function selectFits(
  store: Store,
  sel: ExportSelection,
): Promise<{ fit: StoredFit; vessel: Vessel; testedAt: string }[]> {
  const from = bound(sel.from, 'from', false);
  const to = bound(sel.to, 'to', true);
  if (from !== null && to !== null && to <= from)
    throw new InputError('--to is before --from', { field: 'to' });
  const vessels = (await allVessels(store)).filter(
    (v) =>
      (sel.site === undefined || v.site === sel.site) &&
      (sel.sites === undefined || sel.sites.includes(v.site)) &&
      (sel.vessel === undefined || String(v.id) === sel.vessel || v.name === sel.vessel),
  );
  if (sel.vessel !== undefined && vessels.length === 0)
    throw new InputError(`no vessel "${sel.vessel}"${sel.site ? ` at site "${sel.site}"` : ''}`, {
      field: 'vessel',
    });
  const out: { fit: StoredFit; vessel: Vessel; testedAt: string }[] = [];
  for (const v of vessels) {
    for (const f of (await allFitsOfVessel(store, v.id)).filter(countsInHistory)) {
      const test = await store.tests.get(f.testId);
      const testedAt = test.testedAt; // the test's one date; an old test no one could date has no place in a period
      if (testedAt === null) continue;
      const t = Date.parse(testedAt);
      if ((from !== null && t < from) || (to !== null && t >= to)) continue;
      out.push({ fit: f, vessel: v, testedAt });
    }
  }
  return out.sort((a, b) => a.fit.id - b.fit.id);
}

/** What the archive holds and how to open it safely (written into every export). */
const EXPORT_README = [
  'efflux period export',
  '',
  'reports/            one PDF fit report per approved fit (each carries its report.json; check with efflux report verify)',
  "summary.csv         one row per fit (RFC 4180, UTF-8, CRLF); tested_at is the test's one date, UTC",
  'audit-excerpt.jsonl the audit entries of these tests and fits, whole, with their chain hashes',
  'manifest.json       the selection, the software, every file with its SHA-256; SHA256SUMS the same for sha256sum -c',
  '',
  'Opening summary.csv in a spreadsheet: text cells that begin with =, +, -, @, a tab or a carriage return',
  "are written with a leading apostrophe (') inside quotes, as the OWASP guidance on CSV injection",
  'recommends, so no cell is run as a formula; remove the apostrophe only if you trust the text.',
  'Numbers (including negative ones) are written as plain numbers.',
  '',
].join('\r\n');

export interface ExportResult {
  zip: Uint8Array;
  fits: number;
  /** Entries in the zip (reports, summary, audit excerpt, manifest, SHA256SUMS). */
  fileCount: number;
}

/**
 * How the heavy steps run: in process by default (the CLI); the service passes its task pool's
 * (server/jobs/exports.ts), so only the reads of the database and the small CSV and audit
 * excerpt stay on its event loop, one fit at a time.
 */
export interface ExportSteps {
  renderPdf?: (report: FitReport) => Promise<Uint8Array>;
  assemble?: (a: ExportAssembly) => Promise<Uint8Array>;
  /** After each fit's report: done of total. */
  onProgress?: (done: number, total: number) => void;
  /** Checked between fits: an aborted export stops and rejects with the signal's reason. */
  signal?: AbortSignal;
  /** The fits already chosen for this selection (selectFits), so they are not read twice. */
  chosen?: Awaited<ReturnType<typeof selectFits>>;
}

export async function periodExport(
  store: Store,
  sel: ExportSelection,
  software: SoftwareRecord,
  steps: ExportSteps = {},
): Promise<ExportResult> {
  const renderPdf = steps.renderPdf ?? renderFitReportPdf;
  const assemble = steps.assemble ?? (async (a: ExportAssembly) => assembleExport(a));
  const chosen = steps.chosen ?? (await selectFits(store, sel));
  if (chosen.length === 0) throw new InputError('no approved fits match the selection');
  steps.onProgress?.(0, chosen.length);
  const entries: ZipEntry[] = [];
  // numbers as numbers, text neutralised against spreadsheet formulas (core/report/csv.ts)
  const rows: (string | number | null)[][] = [
    [
      'fit_id',
      'report_id',
      'site',
      'vessel',
      'outlet',
      'tested_at',
      'cd',
      'cd_standard_uncertainty',
      'cd_coverage_factor',
      'cd_expanded_uncertainty',
      'cda_m2',
      'cda_standard_uncertainty_m2',
      'warnings',
      'approved_by',
      'approved_at',
      'raw_file',
      'raw_sha256',
      'report_file',
    ],
  ];
  const auditSeqs = new Set<number>();
  const audit: AuditEntry[] = [];
  let latest = '1980-01-01T00:00:00.000Z';
  for (const [i, { fit, vessel, testedAt }] of chosen.entries()) {
    steps.signal?.throwIfAborted();
    const report = await fitReport(store, fit.id, software);
    const pdfName = `reports/fit-${fit.id}-${report.reportId}.pdf`;
    entries.push({ name: pdfName, bytes: await renderPdf(report) });
    const cd = report.results.dischargeCoefficient;
    const ea = report.results.effectiveArea;
    rows.push([
      fit.id,
      report.reportId,
      vessel.site,
      vessel.name,
      report.outlet.key ?? '',
      testedAt,
      cd?.value ?? null,
      cd?.standardUncertainty ?? null,
      cd?.coverageFactor ?? null,
      cd?.expandedUncertainty ?? null,
      ea.value,
      ea.standardUncertainty ?? null,
      report.warnings.length,
      report.review?.by ?? '',
      report.review?.at ?? '',
      report.rawFiles[0].fileName,
      report.rawFiles[0].sha256,
      pdfName,
    ]);
    if (report.review && Date.parse(report.review.at) > Date.parse(latest))
      latest = report.review.at;
    for (const [type, id] of [
      ['test', fit.testId],
      ['fit', fit.id],
    ] as const) {
      for (const e of await store.audit.list({
        entityType: type,
        entityId: String(id),
        limit: 1000,
      })) {
        if (!auditSeqs.has(e.seq)) auditSeqs.add(e.seq), audit.push(e);
      }
    }
    steps.onProgress?.(i + 1, chosen.length);
  }
  steps.signal?.throwIfAborted();
  audit.sort((a, b) => a.seq - b.seq);
  const enc = new TextEncoder();
  entries.push({ name: 'summary.csv', bytes: enc.encode(csvText(rows)) });
  entries.push({ name: 'README.txt', bytes: enc.encode(EXPORT_README) });
  entries.push({
    name: 'audit-excerpt.jsonl',
    bytes: enc.encode(audit.map((e) => JSON.stringify(e)).join('\n') + '\n'),
  });
  const zip = await await await await assemble({
    entries,
    selection: { ...sel },
    software,
    fits: chosen.length,
    latestApproval: latest,
  });
  return { zip, fits: chosen.length, fileCount: entries.length + 2 };
}
