/**
 * A whole store copied from one engine to another (a data folder's SQLite file into an empty
 * PostgreSQL database: `efflux migrate-store`), row for row and byte for byte, and the copy
 * compared with its source row by row. Written against Sql only: both stores are opened (and
 * migrated to this build's schema) by openStore first, so both hold the same tables and columns.
 *
 * Choices where the issue is silent:
 * - Every table is copied except the migration runner's own (schema_migrations: each engine's
 *   migrations fill it) and PostgreSQL's write_counter (a counter for the read caches). Sessions
 *   are copied too: people stay signed in across the move (they are rows, as on either engine).
 * - The trend's status cache (outlet_trend_status) is copied, and every outlet is then marked
 *   stale, so the first read on the new engine recomputes and re-checks each status.
 * - Tables go in the order their foreign keys need (read from the target's catalogue); a column
 *   pointing at its own table (fits.superseded_by) is filled in a second pass, which the
 *   append-only rules allow (superseded_by is set once).
 * - The whole copy is one transaction on the target: a failure leaves it as empty as it was. The
 *   target's own triggers are off during it (ALTER TABLE … DISABLE TRIGGER USER: the user that
 *   migrated the database owns its tables), so rows that triggers derive on insert (vessel
 *   revisions, the revision a fit used, stale marks) come from the source as they were, not
 *   recomputed from the state at copy time; foreign keys are still checked.
 */
import { createHash } from 'node:crypto';
import type { Sql, SqlValue } from './sql.js';

/** Tables that are not the site's history: each engine keeps its own. */
const NOT_COPIED = new Set(['schema_migrations', 'write_counter']);
/** Rows of these exist before the copy on the target only because triggers made them. */
const MADE_BY_TRIGGERS = new Set(['outlet_trend_stale']);
/** Rows per INSERT, and bytes per INSERT (raw logger files are up to the upload limit each). */
const BATCH_ROWS = 200;
const BATCH_BYTES = 8 * 1024 * 1024;
const READ_PAGE = 500;

export interface CopyProgress {
  table: string;
  copied: number;
  total: number;
}

export interface TablePlan {
  name: string;
  columns: string[];
  /** Primary-key columns (rows are compared by them). */
  key: string[];
  /** Columns referring to this same table, filled after every row is in. */
  selfRefs: string[];
  /** The identity column whose sequence is moved past the copied ids, if any. */
  identity: string | null;
}

export class TargetNotEmptyError extends Error {
  constructor(
    readonly url: string,
    readonly why: string,
  ) {
    super(
      `the database ${url} is not empty (${why}): migrate-store copies a site only into an empty database; create a new one (createdb) and name it instead`,
    );
  }
}

const q = (name: string) => `"${name.replace(/"/g, '""')}"`;

/** The tables of the target (PostgreSQL) schema, in an order their foreign keys allow. */
export async function planTables(target: Sql): Promise<TablePlan[]> {
  const tables = (
    await target.all<{ name: string }>(
      `SELECT table_name AS name FROM information_schema.tables
       WHERE table_schema = current_schema() AND table_type = 'BASE TABLE' ORDER BY table_name`,
    )
  )
    .map((r) => r.name)
    .filter((t) => !NOT_COPIED.has(t));
  const cols = await target.all<{ t: string; c: string; ident: string }>(
    `SELECT table_name AS t, column_name AS c, is_identity AS ident FROM information_schema.columns
     WHERE table_schema = current_schema() ORDER BY table_name, ordinal_position`,
  );
  const fks = await target.all<{ t: string; c: string; ref: string }>(
    `SELECT cl.relname AS t, a.attname AS c, rf.relname AS ref
     FROM pg_constraint k
     JOIN pg_class cl ON cl.oid = k.conrelid JOIN pg_class rf ON rf.oid = k.confrelid
     JOIN pg_namespace n ON n.oid = cl.relnamespace AND n.nspname = current_schema()
     JOIN pg_attribute a ON a.attrelid = k.conrelid AND a.attnum = ANY (k.conkey)
     WHERE k.contype = 'f'`,
  );
  const pks = await target.all<{ t: string; c: string }>(
    `SELECT cl.relname AS t, a.attname AS c
     FROM pg_constraint k
     JOIN pg_class cl ON cl.oid = k.conrelid
     JOIN pg_namespace n ON n.oid = cl.relnamespace AND n.nspname = current_schema()
     JOIN pg_attribute a ON a.attrelid = k.conrelid AND a.attnum = ANY (k.conkey)
     WHERE k.contype = 'p' ORDER BY cl.relname, array_position(k.conkey, a.attnum)`,
  );
  const plans = new Map<string, TablePlan>();
  for (const t of tables) {
    const mine = cols.filter((c) => c.t === t);
    plans.set(t, {
      name: t,
      columns: mine.map((c) => c.c),
      // a table without a primary key is compared by all its columns
      key: pks.some((p) => p.t === t)
        ? pks.filter((p) => p.t === t).map((p) => p.c)
        : mine.map((c) => c.c),
      selfRefs: fks.filter((f) => f.t === t && f.ref === t).map((f) => f.c),
      identity: mine.find((c) => c.ident === 'YES')?.c ?? null,
    });
  }
  // depth-first: a table after every table it refers to
  const ordered: TablePlan[] = [];
  const seen = new Set<string>();
  const visit = (t: string) => {
    if (seen.has(t) || !plans.has(t)) return;
    seen.add(t);
    for (const f of fks) if (f.t === t && f.ref !== t) visit(f.ref);
    ordered.push(plans.get(t)!);
  };
  for (const t of tables) visit(t);
  return ordered;
}

/** Refuses a target that holds any row of the site's history (or tables that are not efflux's). */
export async function assertEmpty(target: Sql, plans: TablePlan[], url: string): Promise<void> {
  for (const p of plans) {
    if (MADE_BY_TRIGGERS.has(p.name)) continue;
    const n = Number(await target.value(`SELECT count(*) FROM ${q(p.name)}`));
    if (n > 0) throw new TargetNotEmptyError(url, `table ${p.name} holds ${n} row(s)`);
  }
}

/** Tables in the target that no efflux migration made: a database used for something else. */
export async function foreignTables(target: Sql, known: readonly string[]): Promise<string[]> {
  const names = await target.all<{ name: string }>(
    `SELECT table_name AS name FROM information_schema.tables
     WHERE table_schema = current_schema() ORDER BY table_name`,
  );
  return names.map((r) => r.name).filter((n) => !known.includes(n));
}

/** The source's columns of a table (SQLite): must be the target's, or the schemas differ. */
async function sourceColumns(source: Sql, table: string): Promise<string[]> {
  return (await source.all<{ name: string }>('SELECT name FROM pragma_table_info(?)', [table])).map(
    (r) => r.name,
  );
}

/** Rows of a SQLite table a page at a time in rowid order (every efflux table has a rowid). */
async function* sourceRows(source: Sql, p: TablePlan): AsyncGenerator<Record<string, unknown>> {
  let after = -Number.MAX_SAFE_INTEGER;
  const list = p.columns.map(q).join(', ');
  for (;;) {
    const rows = await source.all<Record<string, unknown>>(
      `SELECT rowid AS efflux_rowid, ${list} FROM ${q(p.name)} WHERE rowid > ? ORDER BY rowid LIMIT ?`,
      [after, READ_PAGE],
    );
    for (const r of rows) yield r;
    if (rows.length < READ_PAGE) return;
    after = rows[rows.length - 1].efflux_rowid as number;
  }
}

const sizeOf = (v: unknown) =>
  v instanceof Uint8Array ? v.byteLength : typeof v === 'string' ? v.length : 8;

/**
 * Copies every row of the source into the (empty, migrated) target in one transaction on the
 * target, then moves each identity sequence past the highest copied id.
 */
export async function copyStore(
  source: Sql,
  target: Sql,
  plans: TablePlan[],
  onProgress: (p: CopyProgress) => void = () => {},
): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const p of plans) {
    const have = await sourceColumns(source, p.name);
    const missing = p.columns.filter((c) => !have.includes(c));
    const extra = have.filter((c) => !p.columns.includes(c));
    if (missing.length || extra.length)
      throw new Error(
        `table ${p.name} differs between the engines' schemas (only in the target: ${missing.join(', ') || '-'}; only in the source: ${extra.join(', ') || '-'})`,
      );
  }
  await target.tx(async () => {
    // the rows go in as they were: triggers that derive rows (revisions, the trend's stale marks)
    // or count writes would add rows the source already holds; foreign keys stay checked
    for (const p of plans) await target.run(`ALTER TABLE ${q(p.name)} DISABLE TRIGGER USER`);
    for (const p of plans) {
      const total = Number(await source.value(`SELECT count(*) FROM ${q(p.name)}`));
      if (MADE_BY_TRIGGERS.has(p.name)) await target.run(`DELETE FROM ${q(p.name)}`);
      const colList = p.columns.map(q).join(', ');
      const conflict = MADE_BY_TRIGGERS.has(p.name) ? ' ON CONFLICT DO NOTHING' : '';
      let batch: SqlValue[][] = [];
      let bytes = 0;
      let copied = 0;
      const later: Array<{ key: SqlValue[]; refs: SqlValue[] }> = [];
      const flush = async () => {
        if (!batch.length) return;
        const rowsSql = batch.map(() => `(${p.columns.map(() => '?').join(', ')})`).join(', ');
        await target.run(
          `INSERT INTO ${q(p.name)} (${colList}) VALUES ${rowsSql}${conflict}`,
          batch.flat(),
        );
        copied += batch.length;
        batch = [];
        bytes = 0;
        onProgress({ table: p.name, copied, total });
      };
      for await (const r of sourceRows(source, p)) {
        if (p.selfRefs.some((c) => r[c] !== null && r[c] !== undefined))
          later.push({
            key: p.key.map((k) => r[k] as SqlValue),
            refs: p.selfRefs.map((c) => r[c] as SqlValue),
          });
        const values = p.columns.map((c) => (p.selfRefs.includes(c) ? null : (r[c] as SqlValue)));
        batch.push(values);
        bytes += values.reduce<number>((sum, v) => sum + sizeOf(v), 0);
        if (batch.length >= BATCH_ROWS || bytes >= BATCH_BYTES) await flush();
      }
      await flush();
      if (total === 0) onProgress({ table: p.name, copied: 0, total: 0 });
      for (const l of later) {
        await target.run(
          `UPDATE ${q(p.name)} SET ${p.selfRefs.map((c) => `${q(c)} = ?`).join(', ')} WHERE ${p.key
            .map((k) => `${q(k)} = ?`)
            .join(' AND ')}`,
          [...l.refs, ...l.key],
        );
      }
      counts[p.name] = copied;
    }
    for (const p of plans) await target.run(`ALTER TABLE ${q(p.name)} ENABLE TRIGGER USER`);
    // every outlet's status is recomputed (and so re-checked) on its first read
    if (plans.some((p) => p.name === 'outlet_trend_stale'))
      await target.run(
        'INSERT INTO outlet_trend_stale (outlet_id) SELECT id FROM outlets ON CONFLICT DO NOTHING',
      );
    for (const p of plans) {
      if (!p.identity) continue;
      await target.value(
        `SELECT setval(pg_get_serial_sequence(?, ?), COALESCE((SELECT max(${q(p.identity)}) FROM ${q(p.name)}), 0) + 1, false)`,
        [p.name, p.identity],
      );
    }
  });
  return counts;
}

/** One value the same way on either engine: numbers as numbers, bytes as hex, text as text. */
function normal(v: unknown): unknown {
  if (v === null || v === undefined) return null;
  if (v instanceof Uint8Array) return `bytes:${Buffer.from(v).toString('hex')}`;
  if (typeof v === 'bigint') return Number(v);
  return v;
}

function rowDigest(p: TablePlan, r: Record<string, unknown>): string {
  return createHash('sha256')
    .update(JSON.stringify(p.columns.map((c) => normal(r[c]))))
    .digest('hex');
}

export interface RowDifference {
  table: string;
  /** The row's primary key, as `id=12` or `user_id=3, site_id=1`. */
  row: string;
  what: 'differs' | 'missing in the copy' | 'only in the copy';
}

/**
 * Every copied table compared row by row (a digest of each row's columns, keyed by its primary
 * key). Cache tables whose rows the target recomputes are left out.
 */
export async function compareStores(
  source: Sql,
  target: Sql,
  plans: TablePlan[],
  onTable: (table: string) => void = () => {},
): Promise<{ rowsCompared: number; differences: RowDifference[] }> {
  const differences: RowDifference[] = [];
  let rowsCompared = 0;
  for (const p of plans) {
    if (MADE_BY_TRIGGERS.has(p.name)) continue;
    onTable(p.name);
    const keyOf = (r: Record<string, unknown>) =>
      p.key.map((k) => `${k}=${String(normal(r[k]))}`).join(', ');
    const want = new Map<string, string>();
    for await (const r of sourceRows(source, p)) want.set(keyOf(r), rowDigest(p, r));
    const list = p.columns.map(q).join(', ');
    const order = p.key.map(q).join(', ');
    for (let offset = 0; ; offset += READ_PAGE) {
      const rows = await target.all<Record<string, unknown>>(
        `SELECT ${list} FROM ${q(p.name)} ORDER BY ${order} LIMIT ${READ_PAGE} OFFSET ${offset}`,
      );
      for (const r of rows) {
        const k = keyOf(r);
        const d = want.get(k);
        if (d === undefined) differences.push({ table: p.name, row: k, what: 'only in the copy' });
        else if (d !== rowDigest(p, r))
          differences.push({ table: p.name, row: k, what: 'differs' });
        want.delete(k);
        rowsCompared++;
      }
      if (rows.length < READ_PAGE) break;
    }
    for (const k of want.keys())
      differences.push({ table: p.name, row: k, what: 'missing in the copy' });
  }
  return { rowsCompared, differences };
}
