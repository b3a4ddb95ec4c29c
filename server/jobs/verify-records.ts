/**
 * Every stored copy checked against what it was copied from (issue 12): the result numbers copied
 * into columns of `fits` (what the trend, fleet and exports read) against the fit's stored result;
 * the result itself, its status and supersession against the fit's last audit entry (whose hash
 * chain `audit.verify()` checks); each test's date against its source (the stated date in its
 * upload entry, or the first fit's window start); and each outlet's cached status against a
 * recomputation at the time it was computed. Each difference names the table, row and field.
 */
import { createHash } from 'node:crypto';
import { logTestDate } from '../core/analysis/test-date.js';
import { canonicalJson } from '../store/canonical-json.js';
import type { Store } from '../store/index.js';
import { pagedRows } from '../store/pages.js';
import { computeStatus } from './trend.js';

export interface RecordDifference {
  table: string;
  row: number;
  field: string;
  stored: unknown;
  expected: unknown;
  message: string;
}

export interface RecordsReport {
  ok: boolean;
  fitsChecked: number;
  outletsChecked: number;
  differences: RecordDifference[];
  /** Old tests migration 003 could not date: not a difference, but said. */
  undatedTests: { testId: number; reason: string }[];
}

interface FitCopyRow {
  id: number;
  test_id: number;
  result: string;
  status: string;
  superseded_by: number | null;
  cda_m2: number | null;
  cd: number | null;
  cda_u: number | null;
  cd_u: number | null;
}

/** The same rule as the store's insert: a finite number at result[key][field], else null. */
function numberAt(
  result: Record<string, unknown>,
  key: string,
  field: 'value' | 'standardUncertainty',
): number | null {
  const v = (result[key] as Record<string, unknown> | null | undefined)?.[field];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

const COPIES: [column: keyof FitCopyRow, key: string, field: 'value' | 'standardUncertainty'][] = [
  ['cda_m2', 'effectiveAreaM2', 'value'],
  ['cd', 'dischargeCoefficient', 'value'],
  ['cda_u', 'effectiveAreaM2', 'standardUncertainty'],
  ['cd_u', 'dischargeCoefficient', 'standardUncertainty'],
];

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

export async function verifyRecords(store: Store): Promise<RecordsReport> {
  const sql = store.sql;
  const differences: RecordDifference[] = [];
  const differ = (
    table: string,
    row: number,
    field: string,
    stored: unknown,
    expected: unknown,
    why: string,
  ) =>
    differences.push({
      table,
      row,
      field,
      stored,
      expected,
      message: `${table} row ${row}: ${field} is ${JSON.stringify(stored)} but ${why} says ${JSON.stringify(expected)}`,
    });

  // the last audit entry of each fit and each test (the chain itself is checked by audit.verify)
  const lastFitEntry = new Map<string, Record<string, unknown>>();
  const uploadEntry = new Map<string, Record<string, unknown>>();
  for await (const e of pagedRows<{
    seq: number;
    entity_type: string;
    entity_id: string;
    action: string;
    after: string | null;
  }>(
    sql,
    `SELECT seq, entity_type, entity_id, action, after FROM audit_log
    WHERE entity_type IN ('fit', 'test') AND seq > @after ORDER BY seq LIMIT @pageRows`,
    (r) => r.seq,
  )) {
    if (e.after === null) continue;
    if (e.entity_type === 'fit') lastFitEntry.set(e.entity_id, JSON.parse(e.after));
    else if (e.action === 'test.upload') uploadEntry.set(e.entity_id, JSON.parse(e.after));
  }

  let fitsChecked = 0;
  const firstWindow = new Map<number, { startS: number; startTime?: unknown }>();
  for await (const r of pagedRows<FitCopyRow>(
    sql,
    'SELECT id, test_id, result, status, superseded_by, cda_m2, cd, cda_u, cd_u FROM fits WHERE id > @after ORDER BY id LIMIT @pageRows',
    (r) => r.id,
  )) {
    fitsChecked++;
    const result = JSON.parse(r.result) as Record<string, unknown>;
    if (!firstWindow.has(r.test_id))
      firstWindow.set(
        r.test_id,
        (result.window ?? { startS: NaN }) as { startS: number; startTime?: unknown },
      );
    for (const [column, key, field] of COPIES) {
      const expected = numberAt(result, key, field);
      if (r[column] !== expected)
        differ('fits', r.id, column, r[column], expected, `its stored result (${key}.${field})`);
    }
    const entry = lastFitEntry.get(String(r.id));
    if (!entry) {
      differ(
        'fits',
        r.id,
        'audit',
        null,
        'an entry',
        'the audit log has no entry for it and the store',
      );
      continue;
    }
    const hash = sha256(canonicalJson(result));
    if (entry.resultSha256 !== hash)
      differ(
        'fits',
        r.id,
        'result',
        `sha256 ${hash}`,
        `sha256 ${String(entry.resultSha256)}`,
        'its last audit entry',
      );
    if (entry.status !== r.status)
      differ('fits', r.id, 'status', r.status, entry.status, 'its last audit entry');
    if ((entry.supersededBy ?? null) !== r.superseded_by)
      differ(
        'fits',
        r.id,
        'superseded_by',
        r.superseded_by,
        entry.supersededBy ?? null,
        'its last audit entry',
      );
  }

  // each analysed test's one date against where it came from
  for await (const t of pagedRows<{
    id: number;
    tested_at: string | null;
    tested_at_source: string | null;
    detected: string | null;
  }>(
    sql,
    `SELECT id, tested_at, tested_at_source, detected FROM drain_tests
    WHERE status = 'analysed' AND id > @after ORDER BY id LIMIT @pageRows`,
    (r) => r.id,
  )) {
    if (t.tested_at_source === 'stated') {
      const up = uploadEntry.get(String(t.id));
      if (up && up.testedAt !== t.tested_at)
        differ(
          'drain_tests',
          t.id,
          'tested_at',
          t.tested_at,
          up.testedAt,
          'its upload audit entry',
        );
    } else if (t.tested_at_source === 'log') {
      const w = firstWindow.get(t.id);
      const fromLog = w
        ? logTestDate(
            w,
            t.detected ? (JSON.parse(t.detected) as { metadata?: unknown }).metadata : null,
          )
        : null;
      if (fromLog !== t.tested_at)
        differ(
          'drain_tests',
          t.id,
          'tested_at',
          t.tested_at,
          fromLog,
          "its first fit's window start (the log's own clock)",
        );
    } else if (t.tested_at !== null) {
      differ('drain_tests', t.id, 'tested_at_source', null, 'stated or log', 'a dated test');
    }
  }

  // the status cache against a recomputation at the moment it was computed (stale rows are recomputed on the next read)
  let outletsChecked = 0;
  const stale = new Set(await store.trends.staleOutlets());
  for await (const c of pagedRows<{
    outlet_id: number;
    status: string;
    days_to_threshold: number | null;
    computed_at_ms: number;
    valid_until_ms: number;
    body: string;
  }>(
    sql,
    `SELECT outlet_id, status, days_to_threshold, computed_at_ms, valid_until_ms, body FROM outlet_trend_status
    WHERE outlet_id > @after ORDER BY outlet_id LIMIT @pageRows`,
    (r) => r.outlet_id,
  )) {
    if (stale.has(c.outlet_id)) continue;
    outletsChecked++;
    const again = await computeStatus(store, c.outlet_id, Number(c.computed_at_ms));
    const body = { ...again.status, forecastStatus: again.forecastStatus };
    const why = `a recomputation at ${new Date(c.computed_at_ms).toISOString()}`;
    if (c.status !== again.status.status)
      differ('outlet_trend_status', c.outlet_id, 'status', c.status, again.status.status, why);
    if (c.days_to_threshold !== again.status.daysToThreshold)
      differ(
        'outlet_trend_status',
        c.outlet_id,
        'days_to_threshold',
        c.days_to_threshold,
        again.status.daysToThreshold,
        why,
      );
    const validUntil = Number.isFinite(again.validUntilMs) ? again.validUntilMs : 8.64e15;
    if (Number(c.valid_until_ms) !== validUntil)
      differ(
        'outlet_trend_status',
        c.outlet_id,
        'valid_until_ms',
        c.valid_until_ms,
        validUntil,
        why,
      );
    if (canonicalJson(JSON.parse(c.body)) !== canonicalJson(JSON.parse(JSON.stringify(body))))
      differ('outlet_trend_status', c.outlet_id, 'body', JSON.parse(c.body), body, why);
  }

  return {
    ok: differences.length === 0,
    fitsChecked,
    outletsChecked,
    differences,
    undatedTests: await store.tests.undated(),
  };
}
