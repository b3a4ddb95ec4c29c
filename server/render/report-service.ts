/**
 * Reports from the store (shell side): build a fit or outlet report and its PDF, and verify a
 * report file against the records — the same rebuild, the stored fit recomputed from the stored
 * raw bytes, and the audit chain.
 */
import { createHash } from 'node:crypto';
import type { AnalysisRequest, FitJson } from '../core/analysis-contract.js';
import { analyzeDrainTest, expandWorkbook } from '../core/analyze.js';
import {
  buildFitReport,
  buildOutletReport,
  compareReports,
  contentHash,
  reportIdOf,
  type FitReport,
  type OutletReport,
  type ReportDifference,
  type SoftwareRecord,
} from '../core/report/index.js';
import { sha256Hex } from '../sha256.js';
import { canonicalJson } from '../store/canonical-json.js';
import { verifyRecords } from '../jobs/verify-records.js';
import type { Store } from '../store/index.js';
import { renderFitReportPdf } from './fit-report-pdf.js';
import { renderOutletReportPdf } from './outlet-report-pdf.js';
import { readReportFile, type ReportFile } from './report-file.js';
import { reportUnits } from './report-format.js';
import { fitReportRecords, outletReportRecords } from './report-records.js';

export async function fitReport(
  store: Store,
  fitId: number,
  software: SoftwareRecord,
): Promise<FitReport> {
  return buildFitReport(await fitReportRecords(store, fitId), software, sha256Hex);
}

export async function outletReport(
  store: Store,
  outletId: number,
  software: SoftwareRecord,
  asOf?: string,
): Promise<OutletReport> {
  return buildOutletReport(await outletReportRecords(store, outletId), software, sha256Hex, asOf);
}

export { renderFitReportPdf, renderOutletReportPdf };

const sha256 = (b: Uint8Array | string) => createHash('sha256').update(b).digest('hex');

export interface Check {
  name: string;
  ok: boolean;
  detail: string;
  differences?: ReportDifference[];
}

export interface VerifyOutcome {
  ok: boolean;
  kind: 'fit' | 'outlet';
  reportId: string;
  checks: Check[];
}

/** The request that produced a stored fit: its raw bytes, the vessel file it was given, its settings. */
async function storedRequest(
  store: Store,
  fitId: number,
): Promise<{ request: AnalysisRequest; result: FitJson }> {
  const fit = await store.fits.get(fitId);
  const test = await store.tests.get(fit.testId);
  return {
    request: {
      log: { bytes: await store.tests.rawBytes(test.sha256), fileName: test.fileName },
      baro: test.baro
        ? { bytes: await store.tests.rawBytes(test.baro.sha256), fileName: test.baro.fileName }
        : undefined,
      vessel: fit.vessel,
      settings: fit.settings,
    },
    result: fit.result as FitJson,
  };
}

const withoutTiming = (r: Record<string, unknown>) => {
  const { timing: _t, ...rest } = r;
  return rest;
};

/**
 * When the engine has changed since a fit was stored, a recomputation is not expected to be bit
 * for bit the same (a new integrator step, a new solver path); it must agree on the results within
 * this fraction of the stored standard uncertainty of each. The stored result is never rewritten.
 */
export const ENGINE_CHANGE_TOLERANCE = 0.05;

/** The headline results of a fit JSON: Cd·a and Cd, each with its standard uncertainty. */
function headlines(
  r: FitJson,
): { name: string; unit: string; value: number | null; u: number | null }[] {
  const pick = (e: { value?: unknown; standardUncertainty?: unknown } | null | undefined) => ({
    value: typeof e?.value === 'number' ? e.value : null,
    u: typeof e?.standardUncertainty === 'number' ? e.standardUncertainty : null,
  });
  return [
    { name: 'Cd·a', unit: ' m²', ...pick(r.effectiveAreaM2) },
    { name: 'Cd', unit: '', ...pick(r.dischargeCoefficient) },
  ];
}

/** The stored and recomputed headline results side by side, against ENGINE_CHANGE_TOLERANCE. */
export function engineChange(stored: FitJson, again: FitJson): { ok: boolean; text: string } {
  const now = headlines(again);
  let ok = true;
  const parts = headlines(stored).map((s, i) => {
    const a = now[i];
    if (s.value === null && a.value === null) return `${s.name}: none either way`;
    if (s.value === null || a.value === null || s.u === null || !(s.u > 0)) {
      ok = false;
      return `${s.name}: stored ${s.value ?? 'none'}, recomputed ${a.value ?? 'none'} (cannot be compared)`;
    }
    const diff = a.value - s.value;
    const share = Math.abs(diff) / s.u;
    if (!(share <= ENGINE_CHANGE_TOLERANCE)) ok = false;
    return `${s.name} ${s.value.toPrecision(7)}${s.unit} → ${a.value.toPrecision(7)}${s.unit}, difference ${diff.toPrecision(2)}${s.unit} = ${(share * 100).toPrecision(2)} % of its standard uncertainty`;
  });
  return {
    ok,
    text: `${parts.join('; ')} (tolerance ${ENGINE_CHANGE_TOLERANCE * 100} % of the stored standard uncertainty)`,
  };
}

/**
 * Re-runs a stored fit from the stored bytes and settings. Under the engine that stored it: identical
 * numbers, timing aside, or the differences. Under a newer engine: says so, and compares the results
 * against ENGINE_CHANGE_TOLERANCE instead of asking for bit equality.
 */
export async function reproduceFit(store: Store, fitId: number): Promise<Check> {
  const { request, result } = await storedRequest(store, fitId);
  const raw = sha256(request.log.bytes);
  const test = await store.tests.get((await store.fits.get(fitId)).testId);
  if (raw !== test.sha256)
    return {
      name: `reproduce fit ${fitId}`,
      ok: false,
      detail: `the stored raw bytes hash to ${raw}, not the recorded ${test.sha256}`,
    };
  let again: FitJson;
  try {
    again = analyzeDrainTest(await expandWorkbook(request)).fit;
  } catch (e) {
    return {
      name: `reproduce fit ${fitId}`,
      ok: false,
      detail: `the stored input no longer analyses: ${(e as Error).message}`,
    };
  }
  const name = `reproduce fit ${fitId}`;
  const storedEngine = typeof result.engineVersion === 'string' ? result.engineVersion : 'unknown';
  if (storedEngine !== again.engineVersion) {
    const change = engineChange(result, again);
    const differences = compareReports(
      withoutTiming(result),
      withoutTiming(again as Record<string, unknown>),
      10,
    );
    return {
      name,
      // a newer engine may choose another window or step: a difference is reported, not taken for tampering
      // (the stored result's hash and the audit chain are checked separately)
      ok: true,
      detail: `the engine changed since this fit was stored (stored by ${storedEngine}, recomputed by ${again.engineVersion}), so the numbers are compared, not the bits; the stored result is kept as it was: ${change.ok ? 'within' : 'BEYOND'} the tolerance: ${change.text}${change.ok ? '' : "; a refit would adopt the new engine's result"}`,
      differences,
    };
  }
  const a = canonicalJson(withoutTiming(result));
  const b = canonicalJson(withoutTiming(again as Record<string, unknown>));
  if (a === b)
    return {
      name,
      ok: true,
      detail: 'recomputed from the stored raw bytes and settings: identical numbers (timing aside)',
    };
  const differences = compareReports(
    withoutTiming(result),
    withoutTiming(again as Record<string, unknown>),
    10,
  );
  return {
    name,
    ok: false,
    detail: `the stored result differs from a recomputation from the stored raw bytes (engine ${again.engineVersion}, stored by ${result.engineVersion}) at ${differences.map((d) => d.path).join(', ')}`,
    differences,
  };
}

/** The stored result against the hash the audit log recorded for it when the fit was last written. */
async function auditedResult(store: Store, fitId: number): Promise<Check> {
  const fit = await store.fits.get(fitId);
  const entries = await store.audit.list({
    entityType: 'fit',
    entityId: String(fitId),
    limit: 1000,
  });
  const last = [...entries]
    .reverse()
    .find((e) => (e.after as { resultSha256?: string } | null)?.resultSha256);
  const recorded = (last?.after as { resultSha256?: string } | undefined)?.resultSha256;
  const now = sha256(canonicalJson(fit.result));
  if (!recorded)
    return {
      name: `audit record of fit ${fitId}`,
      ok: false,
      detail: 'the audit log holds no hash of this fit',
    };
  if (recorded !== now)
    return {
      name: `audit record of fit ${fitId}`,
      ok: false,
      detail: `the stored fit result was changed after audit entry ${last!.seq} recorded it (hash ${now.slice(0, 16)}…, recorded ${recorded.slice(0, 16)}…)`,
    };
  return {
    name: `audit record of fit ${fitId}`,
    ok: true,
    detail: `stored result matches the hash in audit entry ${last!.seq}`,
  };
}

function softwareOf(file: ReportFile): SoftwareRecord {
  if (file.report?.software) return file.report.software as SoftwareRecord;
  const [name, version, gitCommit] = (file.info.EffluxSoftware ?? 'efflux unknown unknown').split(
    ' ',
  );
  return { name, version, gitCommit };
}

export async function verifyReport(
  store: Store,
  bytes: Buffer,
  fileName: string,
): Promise<VerifyOutcome> {
  const file = readReportFile(bytes, fileName);
  const checks: Check[] = [];
  // 1. the file agrees with itself
  if (file.report) {
    const h = contentHash(file.report, sha256Hex);
    const ok =
      h === file.contentSha256 &&
      reportIdOf(h) === file.reportId &&
      file.report.contentSha256 === file.contentSha256;
    checks.push({
      name: 'file content hash',
      ok,
      detail: ok
        ? `the report's content hashes to ${h}`
        : `the report's content hashes to ${h}, but the file states ${file.contentSha256} (id ${file.reportId}): edited after it was written`,
    });
  } else {
    checks.push({
      name: 'file content hash',
      ok: false,
      detail: 'the PDF has no attached report.json; only the bytes can be compared',
    });
  }
  // 2. rebuilt from the records
  const software = softwareOf(file);
  let rebuilt: FitReport | OutletReport;
  const fitIds: number[] = [];
  if (file.kind === 'fit') {
    const fitId = Number(file.report?.fitId ?? file.info.EffluxFitId);
    rebuilt = await fitReport(store, fitId, software);
    fitIds.push(fitId);
  } else {
    const outletId = Number(file.report?.outlet?.id ?? file.info.EffluxOutletId);
    const asOf = String(file.report?.asOf ?? file.info.EffluxAsOf);
    rebuilt = await outletReport(store, outletId, software, asOf);
    fitIds.push(...rebuilt.fits.map((f) => f.fitId));
  }
  const same = rebuilt.contentSha256 === file.contentSha256;
  const differences =
    same || !file.report
      ? []
      : compareReports(file.report, rebuilt, 20, ['reportId', 'contentSha256']);
  checks.push({
    name: 'records',
    ok: same,
    detail: same
      ? `rebuilt from the database: same content (report ${rebuilt.reportId})`
      : `rebuilt from the database the report is ${rebuilt.reportId}, not ${file.reportId}` +
        (differences.length ? `; differs at ${differences.map((d) => d.path).join(', ')}` : ''),
    differences,
  });
  // 3. the PDF's bytes
  if (file.type === 'pdf') {
    const pdf =
      file.kind === 'fit'
        ? await renderFitReportPdf(rebuilt as FitReport, reportUnits(file.info))
        : await renderOutletReportPdf(rebuilt as OutletReport, reportUnits(file.info));
    const a = sha256(bytes);
    const b = sha256(pdf);
    checks.push({
      name: 'PDF bytes',
      ok: a === b,
      detail:
        a === b
          ? `re-rendered PDF is byte-identical (SHA-256 ${a})`
          : `re-rendered PDF has SHA-256 ${b}, the file ${a}`,
    });
  }
  // 4. every fit reproduces from the stored raw bytes, and matches what the audit log recorded
  for (const id of fitIds) {
    checks.push(await reproduceFit(store, id));
    checks.push(await auditedResult(store, id));
  }
  // 5. the audit chain
  const chain = await store.audit.verify();
  checks.push({
    name: 'audit chain',
    ok: chain.ok,
    detail: chain.ok
      ? `intact, ${chain.count} entries, head ${chain.head}`
      : `broken at entry ${chain.brokenAt}: ${chain.reason}`,
  });
  // 6. every stored copy (result columns, test dates, status cache) against what it was copied from
  const records = await verifyRecords(store);
  checks.push({
    name: 'stored copies',
    ok: records.ok,
    detail: records.ok
      ? `${records.fitsChecked} fits and ${records.outletsChecked} cached outlet statuses agree with their sources`
      : records.differences
          .slice(0, 20)
          .map((d) => d.message)
          .join('; '),
  });
  return { ok: checks.every((c) => c.ok), kind: file.kind, reportId: file.reportId, checks };
}
