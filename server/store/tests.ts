import { sha256Hex } from '../sha256.js';
import type { Actor } from './audit.js';
import { parse, type StoreContext } from './context.js';
import { ConflictError, DuplicateUploadError, NotFoundError } from './errors.js';
import { ReadCache, readyText, type ReadyText } from './read-cache.js';

export interface RawInput {
  bytes: Uint8Array;
  fileName: string;
}

export interface NewDrainTest {
  vesselId: number;
  outletId: number | null;
  log: RawInput;
  baro?: RawInput;
  settings: Record<string, unknown>;
  operator?: string | null;
  loggerId?: string | null;
  /** The date the person stated, already checked and in UTC ISO 8601; else the log's own (at analysis). */
  testedAt?: string | null;
  notes?: string | null;
  /** Store it even when a test of this vessel has the same bytes (recorded in the audit entry). */
  allowDuplicate?: boolean;
  /** The client's Idempotency-Key for this upload (per person). */
  idempotencyKey?: string | null;
}

/** Where a test's date came from: stated by the person, or the first reading of the fitted window. */
export type TestedAtSource = 'stated' | 'log';

export interface DrainTest {
  id: number;
  vesselId: number;
  outletId: number | null;
  status: 'pending' | 'analysed';
  sha256: string;
  fileName: string;
  size: number;
  baro: { sha256: string; fileName: string; size: number } | null;
  settings: Record<string, unknown>;
  detected: Record<string, unknown> | null;
  operator: string | null;
  loggerId: string | null;
  /** THE date of the test (UTC ISO 8601); null only while pending or for an old test no one could date. */
  testedAt: string | null;
  testedAtSource: TestedAtSource | null;
  notes: string | null;
  createdBy: number | null;
  createdAt: string;
  /** Analyses of this test that failed for a reason other than its input (timeout, worker fault, full disk). */
  failedAttempts: number;
  lastFailure: string | null;
  /** Pending and failed MAX_ANALYSIS_ATTEMPTS times: no longer retried at start; a person retries or withdraws it. */
  stuck: boolean;
}

/** Failed analyses after which a pending test is left for a person (retry or withdraw). */
export const MAX_ANALYSIS_ATTEMPTS = 3;

interface TestRow {
  id: number;
  vessel_id: number;
  outlet_id: number | null;
  status: 'pending' | 'analysed';
  log_sha256: string;
  log_name: string;
  log_size: number;
  baro_sha256: string | null;
  baro_name: string | null;
  baro_size: number | null;
  settings: string;
  detected: string | null;
  operator: string | null;
  logger_id: string | null;
  tested_at: string | null;
  tested_at_source: TestedAtSource | null;
  notes: string | null;
  created_by: number | null;
  created_at: string;
  failed_attempts: number;
  last_failure: string | null;
}

export { sha256Hex };

function toTest(r: TestRow): DrainTest {
  return {
    id: r.id,
    vesselId: r.vessel_id,
    outletId: r.outlet_id,
    status: r.status,
    sha256: r.log_sha256,
    fileName: r.log_name,
    size: r.log_size,
    baro: r.baro_sha256
      ? { sha256: r.baro_sha256, fileName: r.baro_name!, size: r.baro_size! }
      : null,
    settings: parse(r.settings)!,
    detected: parse(r.detected),
    operator: r.operator,
    loggerId: r.logger_id,
    testedAt: r.tested_at,
    testedAtSource: r.tested_at_source,
    notes: r.notes,
    createdBy: r.created_by,
    createdAt: r.created_at,
    failedAttempts: Number(r.failed_attempts),
    lastFailure: r.last_failure,
    stuck: isStuck(r),
  };
}

const isStuck = (r: TestRow) =>
  r.status === 'pending' && r.failed_attempts >= MAX_ANALYSIS_ATTEMPTS;

const SELECT = `SELECT t.*, l.size AS log_size, b.size AS baro_size,
  (SELECT count(*) FROM analysis_failures f WHERE f.test_id = t.id) AS failed_attempts,
  (SELECT reason FROM analysis_failures f WHERE f.test_id = t.id ORDER BY f.id DESC LIMIT 1) AS last_failure
  FROM drain_tests t
  JOIN raw_files l ON l.sha256 = t.log_sha256 LEFT JOIN raw_files b ON b.sha256 = t.baro_sha256`;

/** The API's test object as JSON text, spliced from the stored JSON (see fitJson in fits.ts). */
function testJson(r: TestRow): string {
  const q = JSON.stringify;
  const baro = r.baro_sha256
    ? q({ sha256: r.baro_sha256, fileName: r.baro_name, size: r.baro_size })
    : 'null';
  return (
    `{"id":${r.id},"vesselId":${r.vessel_id},"outletId":${q(r.outlet_id)},"status":${q(r.status)},"sha256":${q(r.log_sha256)},` +
    `"fileName":${q(r.log_name)},"size":${r.log_size},"baro":${baro},"settings":${r.settings},"detected":${r.detected ?? 'null'},` +
    `"operator":${q(r.operator)},"loggerId":${q(r.logger_id)},"testedAt":${q(r.tested_at)},"testedAtSource":${q(r.tested_at_source)},"notes":${q(r.notes)},` +
    `"createdBy":${q(r.created_by)},"createdAt":${q(r.created_at)},"failedAttempts":${r.failed_attempts},` +
    `"lastFailure":${q(r.last_failure)},"stuck":${isStuck(r)}}`
  );
}

const PUT_RAW = `INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES (?, ?, ?, ?)
  ON CONFLICT (sha256) DO NOTHING`;
const DROP_RAW = `DELETE FROM raw_files WHERE sha256 = @sha AND NOT EXISTS
  (SELECT 1 FROM drain_tests WHERE log_sha256 = @sha OR baro_sha256 = @sha)`;
const INSERT = `INSERT INTO drain_tests (vessel_id, outlet_id, log_sha256, log_name, baro_sha256, baro_name,
  settings, status, operator, logger_id, tested_at, tested_at_source, notes, created_by, created_at)
  VALUES (@vesselId, @outletId, @logSha, @logName, @baroSha, @baroName, @settings, 'pending', @operator,
  @loggerId, @testedAt, @testedAtSource, @notes, @createdBy, @now) RETURNING id`;
const BY_KEY = 'SELECT test_id, log_sha256 FROM upload_keys WHERE user_id = ? AND key = ?';
const ANALYSED = `UPDATE drain_tests SET status = 'analysed', detected = @detected,
  tested_at = coalesce(tested_at, @logDate), tested_at_source = coalesce(tested_at_source, CASE WHEN @logDate IS NULL THEN NULL ELSE 'log' END)
  WHERE id = @id AND status = 'pending'`;

const bufferOf = (b: Uint8Array) => Buffer.from(b.buffer, b.byteOffset, b.byteLength);

/** Drain tests and the raw bytes they were read from. */
export class TestRepo {
  /**
   * Pages of a vessel's tests as sent, keyed by vessel, limit and offset. Any write to a test here
   * empties it, in the transaction and again after its commit (uploads are rare beside reads);
   * other connections' commits too (ForeignWrites).
   */
  private readonly pages: ReadCache<ReadyText>;

  constructor(private readonly c: StoreContext) {
    this.pages = new ReadCache<ReadyText>(
      c.foreign,
      16 * 1024 * 1024,
      (t) => t.body.byteLength + 64,
    );
  }

  /** Empties the pages (a write to a test committed; FitRepo.storeFirst calls it). */
  dropPages(): void {
    this.pages.clear();
  }

  /** Runs a write to tests in one transaction, the pages emptied inside it and after its commit. */
  private async write<T>(fn: () => Promise<T>): Promise<T> {
    this.pages.clear();
    const out = await this.c.sql.tx(fn);
    this.pages.clear();
    return out;
  }

  /**
   * Stores the raw bytes and the test's metadata, committed before any analysis runs, so an
   * upload is never lost to a crash in the analysis. Bytes are kept exactly as received.
   */
  async createPending(actor: Actor, t: NewDrainTest): Promise<DrainTest> {
    const logSha = sha256Hex(t.log.bytes);
    const baroSha = t.baro ? sha256Hex(t.baro.bytes) : null;
    return this.write(async () => {
      const now = this.c.now();
      const keyOwner = actor.id ?? 0;
      if (t.idempotencyKey) {
        const prior = await this.c.sql.get<{ test_id: number }>(BY_KEY, [
          keyOwner,
          t.idempotencyKey,
        ]);
        if (prior)
          throw new ConflictError(
            `an upload with this Idempotency-Key is still being analysed (test ${prior.test_id}); retry shortly`,
          );
      }
      const sameId = await this.c.sql.value(
        'SELECT id FROM drain_tests WHERE vessel_id = ? AND log_sha256 = ? ORDER BY id LIMIT 1',
        [t.vesselId, logSha],
      );
      const same = sameId === undefined ? undefined : Number(sameId);
      if (same !== undefined && !t.allowDuplicate) {
        throw new DuplicateUploadError(
          same,
          `test ${same} of this vessel has the same log file (SHA-256 ${logSha}); send allowDuplicate=true to store it again`,
        );
      }
      await this.c.sql.run(PUT_RAW, [logSha, t.log.bytes.byteLength, bufferOf(t.log.bytes), now]);
      if (t.baro)
        await this.c.sql.run(PUT_RAW, [
          baroSha,
          t.baro.bytes.byteLength,
          bufferOf(t.baro.bytes),
          now,
        ]);
      const id = Number(
        await this.c.sql.value(INSERT, {
          vesselId: t.vesselId,
          outletId: t.outletId,
          logSha,
          logName: t.log.fileName,
          baroSha,
          baroName: t.baro?.fileName ?? null,
          settings: JSON.stringify(t.settings),
          operator: t.operator ?? null,
          loggerId: t.loggerId ?? null,
          testedAt: t.testedAt ?? null,
          testedAtSource: t.testedAt ? 'stated' : null,
          notes: t.notes ?? null,
          createdBy: actor.id,
          now,
        }),
      );
      if (t.idempotencyKey)
        await this.c.sql.run(
          'INSERT INTO upload_keys (user_id, key, test_id, log_sha256, created_at) VALUES (?, ?, ?, ?, ?)',
          [keyOwner, t.idempotencyKey, id, logSha, now],
        );
      const test = await this.get(id);
      const marks = same !== undefined ? { duplicateOf: same, allowDuplicate: true } : {};
      await this.c.audit.append(actor, now, {
        action: 'test.upload',
        entityType: 'test',
        entityId: id,
        after: { ...test, ...marks },
      });
      return test;
    });
  }

  /**
   * Takes back a test whose analysis refused the file: the row and any raw bytes no other test
   * shares are deleted, and the audit log says so (the upload entry stays: the log is append-only).
   */
  async withdraw(actor: Actor, id: number, reason: string): Promise<void> {
    await this.write(async () => {
      const before = await this.get(id);
      const removed = await this.c.sql.run(
        `DELETE FROM drain_tests WHERE id = ? AND status = 'pending'`,
        [id],
      );
      if (removed.changes !== 1) throw new Error(`test ${id} is not pending`);
      await this.c.sql.run(DROP_RAW, { sha: before.sha256 });
      if (before.baro) await this.c.sql.run(DROP_RAW, { sha: before.baro.sha256 });
      await this.c.audit.append(actor, this.c.now(), {
        action: 'test.withdraw',
        entityType: 'test',
        entityId: id,
        before,
        after: { reason },
      });
    });
  }

  /**
   * Notes that an analysis of a pending test failed for a reason other than its input; after
   * MAX_ANALYSIS_ATTEMPTS the test is `stuck` (shown so, skipped by the resume at start).
   */
  async recordFailure(id: number, reason: string): Promise<void> {
    await this.write(async () => {
      await this.c.sql.run(
        'INSERT INTO analysis_failures (test_id, failed_at, reason) VALUES (?, ?, ?)',
        [id, this.c.now(), reason.slice(0, 500)],
      );
    });
  }

  /** The audit entry of a person's request to analyse a pending test again. */
  async noteRetry(actor: Actor, id: number): Promise<void> {
    await this.c.sql.tx(async () => {
      const t = await this.get(id);
      await this.c.audit.append(actor, this.c.now(), {
        action: 'test.retry',
        entityType: 'test',
        entityId: id,
        after: { failedAttempts: t.failedAttempts, lastFailure: t.lastFailure },
      });
    });
  }

  /**
   * Marks a pending test analysed; call inside the transaction that stores its first fit (and
   * dropPages() after its commit). A test with no stated date takes `logDate` (the first reading
   * of the fitted window, UTC), once.
   */
  async markAnalysed(
    id: number,
    detected: Record<string, unknown>,
    logDate: string | null = null,
  ): Promise<void> {
    this.pages.clear();
    const r = await this.c.sql.run(ANALYSED, { detected: JSON.stringify(detected), logDate, id });
    if (r.changes !== 1) throw new Error(`test ${id} is not pending`);
  }

  /** The test an earlier upload with this Idempotency-Key made, with the SHA-256 of its log. */
  async byIdempotencyKey(
    actorId: number | null,
    key: string,
  ): Promise<{ testId: number; sha256: string } | null> {
    const r = await this.c.sql.get<{ test_id: number; log_sha256: string }>(BY_KEY, [
      actorId ?? 0,
      key,
    ]);
    return r ? { testId: r.test_id, sha256: r.log_sha256 } : null;
  }

  /** Tests migration 003 could not date (no stated date, and a log with only elapsed time). */
  async undated(): Promise<{ testId: number; reason: string }[]> {
    const rows = await this.c.sql.all<{ test_id: number; reason: string }>(
      'SELECT test_id, reason FROM undated_tests ORDER BY test_id',
    );
    return rows.map((r) => ({ testId: r.test_id, reason: r.reason }));
  }

  async get(id: number): Promise<DrainTest> {
    const row = await this.c.sql.get<TestRow>(`${SELECT} WHERE t.id = ?`, [id]);
    if (!row) throw new NotFoundError('test', id);
    return toTest(row);
  }

  private async page(vesselId: number, limit: number, offset: number) {
    const rows = await this.c.sql.all<TestRow>(
      `${SELECT} WHERE t.vessel_id = ? ORDER BY t.id DESC LIMIT ? OFFSET ?`,
      [vesselId, limit, offset],
    );
    const total = Number(
      await this.c.sql.value('SELECT count(*) FROM drain_tests WHERE vessel_id = ?', [vesselId]),
    );
    return { rows, total };
  }

  async listByVessel(
    vesselId: number,
    limit: number,
    offset: number,
  ): Promise<{ items: DrainTest[]; total: number }> {
    const { rows, total } = await this.page(vesselId, limit, offset);
    return { items: rows.map(toTest), total };
  }

  /** The items of listByVessel as a JSON array text (the hot read path). */
  async listByVesselJson(
    vesselId: number,
    limit: number,
    offset: number,
  ): Promise<{ itemsJson: string; total: number }> {
    const { rows, total } = await this.page(vesselId, limit, offset);
    return { itemsJson: `[${rows.map(testJson).join(',')}]`, total };
  }

  /** The API's page `{items, total, limit, offset}` of listByVesselJson as UTF-8 bytes, from memory when already read. */
  async pageText(vesselId: number, limit: number, offset: number): Promise<ReadyText> {
    return this.pages.read(`${vesselId}:${limit}:${offset}`, async () => {
      const { itemsJson, total } = await this.listByVesselJson(vesselId, limit, offset);
      return readyText(
        `{"items":${itemsJson},"total":${total},"limit":${limit},"offset":${offset}}`,
      );
    });
  }

  async count(): Promise<number> {
    return Number(await this.c.sql.value('SELECT count(*) FROM drain_tests'));
  }

  /** Tests stored but never analysed (e.g. the process stopped mid-analysis). */
  async pending(): Promise<DrainTest[]> {
    return (
      await this.c.sql.all<TestRow>(`${SELECT} WHERE t.status = 'pending' ORDER BY t.id`)
    ).map(toTest);
  }

  async rawBytes(sha256: string): Promise<Buffer> {
    const b = await this.c.sql.value<Buffer>('SELECT bytes FROM raw_files WHERE sha256 = ?', [
      sha256,
    ]);
    if (!b) throw new NotFoundError('raw file', sha256);
    return b;
  }
}
