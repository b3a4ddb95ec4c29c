import { createHash } from 'node:crypto';
import { canonicalJson } from './canonical-json.js';
import { pagedRows } from './pages.js';
import type { Sql } from './sql.js';

/** Who acted: a user, or the system itself (migrations, demo loading, the CLI). */
export interface Actor {
  id: number | null;
  name: string;
}
export const SYSTEM_ACTOR: Actor = { id: null, name: 'system' };

export interface AuditInput {
  action: string;
  entityType: string;
  entityId: string | number | null;
  before?: unknown;
  after?: unknown;
}

export interface AuditEntry {
  seq: number;
  at: string;
  actorId: number | null;
  actorName: string;
  action: string;
  entityType: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
  prevHash: string;
  hash: string;
}

export const GENESIS_HASH = '0'.repeat(64);

interface AuditRow {
  seq: number;
  at: string;
  actor_id: number | null;
  actor_name: string;
  action: string;
  entity_type: string;
  entity_id: string | null;
  before: string | null;
  after: string | null;
  prev_hash: string;
  hash: string;
}

/** The hash of one entry: it covers the previous hash and every field of the entry. */
export function entryHash(prevHash: string, e: Omit<AuditEntry, 'hash' | 'prevHash'>): string {
  const body = canonicalJson({
    seq: e.seq,
    at: e.at,
    actorId: e.actorId,
    actorName: e.actorName,
    action: e.action,
    entityType: e.entityType,
    entityId: e.entityId,
    before: e.before ?? null,
    after: e.after ?? null,
  });
  return createHash('sha256').update(prevHash).update('\n').update(body).digest('hex');
}

function toEntry(r: AuditRow): AuditEntry {
  return {
    seq: r.seq,
    at: r.at,
    actorId: r.actor_id,
    actorName: r.actor_name,
    action: r.action,
    entityType: r.entity_type,
    entityId: r.entity_id,
    before: r.before === null ? null : JSON.parse(r.before),
    after: r.after === null ? null : JSON.parse(r.after),
    prevHash: r.prev_hash,
    hash: r.hash,
  };
}

export interface AuditFilter {
  entityType?: string;
  entityId?: string;
  actorId?: number;
  action?: string;
  /** Entries of this vessel and of its outlets, tests, fits and maintenance events. */
  vesselId?: number;
  since?: string;
  until?: string;
  afterSeq?: number;
  /** Entries before this one only (paging newest first). */
  beforeSeq?: number;
  /** Newest first instead of oldest first. */
  newestFirst?: boolean;
  limit?: number;
}

const INSERT = `INSERT INTO audit_log
  (seq, at, actor_id, actor_name, action, entity_type, entity_id, before, after, prev_hash, hash)
  VALUES (@seq, @at, @actorId, @actorName, @action, @entityType, @entityId, @before, @after, @prevHash, @hash)`;

/** The entries of one vessel: a withdrawn test's row is gone, its entries still name the vessel. */
const WITHDRAWN_TEST_OF_VESSEL = {
  sqlite: "json_extract(coalesce(before, after), '$.vesselId') = @vesselId",
  postgres: "(coalesce(before, after)::jsonb ->> 'vesselId') = CAST(@vesselId AS TEXT)",
};

export class AuditLog {
  constructor(private readonly sql: Sql) {}

  /**
   * Appends one entry. Must run inside the caller's write transaction, so the change and its
   * record commit together or not at all (the store's repositories always do). The named lock
   * serialises appends across processes and instances before the chain's head is read (SQLite's
   * IMMEDIATE transaction already admits one writer; PostgreSQL takes an advisory lock).
   */
  async append(actor: Actor, at: string, input: AuditInput): Promise<AuditEntry> {
    if (!this.sql.inTx()) throw new Error('audit append outside a transaction');
    await this.sql.lock('audit-chain');
    const prev = await this.sql.get<{ seq: number; hash: string }>(
      'SELECT seq, hash FROM audit_log ORDER BY seq DESC LIMIT 1',
    );
    const partial = {
      seq: (prev?.seq ?? 0) + 1,
      at,
      actorId: actor.id,
      actorName: actor.name,
      action: input.action,
      entityType: input.entityType,
      entityId: input.entityId === null ? null : String(input.entityId),
      before: input.before ?? null,
      after: input.after ?? null,
    };
    const prevHash = prev?.hash ?? GENESIS_HASH;
    const hash = entryHash(prevHash, partial);
    await this.sql.run(INSERT, {
      ...partial,
      before: partial.before === null ? null : canonicalJson(partial.before),
      after: partial.after === null ? null : canonicalJson(partial.after),
      prevHash,
      hash,
    });
    return { ...partial, prevHash, hash };
  }

  async list(f: AuditFilter = {}): Promise<AuditEntry[]> {
    // Fixed SQL with optional parameters (a NULL parameter disables its condition): no SQL text is
    // ever assembled from input. The CASTs give PostgreSQL each parameter's type where it first
    // meets it (`$1 IS NULL` alone leaves it undetermined).
    const rows = await this.sql.all<AuditRow>(
      `SELECT * FROM audit_log WHERE
          (CAST(@entityType AS TEXT) IS NULL OR entity_type = @entityType) AND
          (CAST(@entityId AS TEXT) IS NULL OR entity_id = @entityId) AND
          (CAST(@actorId AS BIGINT) IS NULL OR actor_id = @actorId) AND
          (CAST(@action AS TEXT) IS NULL OR action = @action) AND
          (CAST(@vesselId AS BIGINT) IS NULL OR
            (entity_type = 'vessel' AND entity_id = CAST(CAST(@vesselId AS INTEGER) AS TEXT)) OR
            (entity_type = 'outlet' AND entity_id IN (SELECT CAST(id AS TEXT) FROM outlets WHERE vessel_id = @vesselId)) OR
            (entity_type = 'test' AND (entity_id IN (SELECT CAST(id AS TEXT) FROM drain_tests WHERE vessel_id = @vesselId)
              OR ${WITHDRAWN_TEST_OF_VESSEL[this.sql.dialect]})) OR
            (entity_type = 'fit' AND entity_id IN (SELECT CAST(id AS TEXT) FROM fits WHERE vessel_id = @vesselId)) OR
            (entity_type = 'maintenance-event' AND entity_id IN (SELECT CAST(id AS TEXT) FROM maintenance_events WHERE vessel_id = @vesselId))) AND
          (CAST(@since AS TEXT) IS NULL OR at >= @since) AND
          (CAST(@until AS TEXT) IS NULL OR at < @until) AND
          seq > @afterSeq AND (CAST(@beforeSeq AS BIGINT) IS NULL OR seq < @beforeSeq)
        ORDER BY seq ${f.newestFirst ? 'DESC' : 'ASC'} LIMIT @limit`,
      {
        entityType: f.entityType ?? null,
        entityId: f.entityId ?? null,
        actorId: f.actorId ?? null,
        action: f.action ?? null,
        vesselId: f.vesselId ?? null,
        since: f.since ?? null,
        until: f.until ?? null,
        afterSeq: f.afterSeq ?? 0,
        beforeSeq: f.beforeSeq ?? null,
        limit: f.limit ?? 100,
      },
    );
    return rows.map(toEntry);
  }

  /** Walks the whole chain; reports the first entry that does not fit. */
  async verify(): Promise<ChainReport> {
    let prevHash = GENESIS_HASH;
    let expectedSeq = 1;
    let count = 0;
    for await (const row of pagedRows<AuditRow>(
      this.sql,
      'SELECT * FROM audit_log WHERE seq > @after ORDER BY seq LIMIT @pageRows',
      (r) => r.seq,
      {},
      Number.MIN_SAFE_INTEGER, // a tampered seq below 1 is read too
    )) {
      count++;
      const e = toEntry(row);
      if (e.seq !== expectedSeq) {
        return {
          ok: false,
          count,
          head: prevHash,
          brokenAt: e.seq,
          reason: `entry ${expectedSeq} is missing (next is ${e.seq})`,
        };
      }
      if (e.prevHash !== prevHash) {
        return {
          ok: false,
          count,
          head: prevHash,
          brokenAt: e.seq,
          reason: `entry ${e.seq} does not point at the hash of entry ${e.seq - 1}`,
        };
      }
      const { hash, prevHash: _p, ...rest } = e;
      if (entryHash(prevHash, rest) !== hash) {
        return {
          ok: false,
          count,
          head: prevHash,
          brokenAt: e.seq,
          reason: `entry ${e.seq} was changed after it was written (its hash does not match its content)`,
        };
      }
      prevHash = hash;
      expectedSeq++;
    }
    return { ok: true, count, head: prevHash };
  }
}

export interface ChainReport {
  ok: boolean;
  /** Entries read (up to and including the broken one). */
  count: number;
  /** Hash of the last good entry: write it down elsewhere to detect a cut-off tail later. */
  head: string;
  brokenAt?: number;
  reason?: string;
}
