import type { FitJson } from '../core/analysis-contract.js';
import { createHash } from 'node:crypto';
import type { Actor } from './audit.js';
import { canonicalJson } from './canonical-json.js';
import { parse, type StoreContext } from './context.js';
import { ConflictError, NotFoundError } from './errors.js';
import { ReadCache, readyText, type ReadyText } from './read-cache.js';
import type { TestRepo } from './tests.js';

/**
 * The API's fit object as JSON text, spliced from the stored JSON columns without parsing them:
 * the hot read path skips JSON.parse and re-serialising a result of tens of KiB. The stored texts
 * were written by JSON.stringify, so they are valid JSON. Must match toFit (a store test checks).
 */
function fitJson(r: FitRow): string {
  const review = r.reviewed_at ? JSON.stringify({ comment: r.review_comment, by: r.reviewed_by, at: r.reviewed_at }) : 'null';
  return (
    `{"id":${r.id},"testId":${r.test_id},"vesselId":${r.vessel_id},"outletId":${JSON.stringify(r.outlet_id)},` +
    `"settings":${r.settings},"vessel":${r.vessel_spec},"result":${r.result},"engineVersion":${JSON.stringify(r.engine_version)},` +
    `"status":${JSON.stringify(r.status)},"supersededBy":${JSON.stringify(r.superseded_by)},"review":${review},` +
    `"createdBy":${JSON.stringify(r.created_by)},"createdAt":${JSON.stringify(r.created_at)}}`
  );
}

/** Room for about a thousand fits of 40 KiB; answers beyond it are read again from SQLite. */
const FIT_CACHE_BYTES = 48 * 1024 * 1024;

export type FitStatus = 'draft' | 'approved' | 'rejected';

export interface StoredFit {
  id: number;
  testId: number;
  vesselId: number;
  outletId: number | null;
  settings: Record<string, unknown>;
  vessel: Record<string, unknown>;
  result: FitJson;
  engineVersion: string;
  status: FitStatus;
  supersededBy: number | null;
  review: { comment: string | null; by: number | null; at: string | null } | null;
  createdBy: number | null;
  createdAt: string;
}

interface FitRow {
  id: number;
  test_id: number;
  vessel_id: number;
  outlet_id: number | null;
  settings: string;
  vessel_spec: string;
  result: string;
  engine_version: string;
  status: FitStatus;
  superseded_by: number | null;
  review_comment: string | null;
  reviewed_by: number | null;
  reviewed_at: string | null;
  created_by: number | null;
  created_at: string;
}

function toFit(r: FitRow): StoredFit {
  return {
    id: r.id,
    testId: r.test_id,
    vesselId: r.vessel_id,
    outletId: r.outlet_id,
    settings: parse(r.settings)!,
    vessel: parse(r.vessel_spec)!,
    result: parse(r.result)!,
    engineVersion: r.engine_version,
    status: r.status,
    supersededBy: r.superseded_by,
    review: r.reviewed_at ? { comment: r.review_comment, by: r.reviewed_by, at: r.reviewed_at } : null,
    createdBy: r.created_by,
    createdAt: r.created_at,
  };
}

/** What the audit log keeps of a fit: identity and a hash of the result, not the whole result. */
function auditView(f: StoredFit) {
  return {
    id: f.id,
    testId: f.testId,
    status: f.status,
    supersededBy: f.supersededBy,
    engineVersion: f.engineVersion,
    settings: f.settings,
    resultSha256: createHash('sha256').update(canonicalJson(f.result)).digest('hex'),
    review: f.review,
  };
}

function numberAt(obj: Record<string, unknown>, key: string, field: 'value' | 'standardUncertainty' = 'value'): number | null {
  const v = (obj[key] as Record<string, unknown> | null | undefined)?.[field];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

export interface NewFit {
  settings: Record<string, unknown>;
  /** The vessel file the analysis was given. */
  vessel: Record<string, unknown>;
  result: Record<string, unknown>;
}

/** Fits: stored as drafts, reviewed once, superseded by refits, never overwritten or deleted. */
export class FitRepo {
  private readonly q;
  /**
   * GET /api/fits/:id answers by id. A fit's row changes only by review and supersession (both
   * here, both drop the entry); other connections' commits empty the cache (ForeignWrites).
   */
  private readonly texts: ReadCache<ReadyText>;

  constructor(
    private readonly c: StoreContext,
    private readonly tests: TestRepo,
  ) {
    const db = c.db;
    this.texts = new ReadCache<ReadyText>(c.foreign, FIT_CACHE_BYTES, (t) => t.body.byteLength + 64);
    this.q = {
      insert: db.prepare(`INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd,
        cda_u, cd_u, status, created_by, created_at) VALUES (@testId, @vesselId, @outletId, @settings, @vesselSpec, @result, @engineVersion,
        @cda, @cd, @cdaU, @cdU, 'draft', @createdBy, @now)`),
      get: db.prepare('SELECT * FROM fits WHERE id = ?'),
      byVessel: db.prepare('SELECT * FROM fits WHERE vessel_id = ? ORDER BY id DESC LIMIT ? OFFSET ?'),
      countVessel: db.prepare('SELECT count(*) FROM fits WHERE vessel_id = ?').pluck(),
      byTest: db.prepare('SELECT * FROM fits WHERE test_id = ? ORDER BY id'),
      supersede: db.prepare('UPDATE fits SET superseded_by = ? WHERE id = ? AND superseded_by IS NULL'),
      review: db.prepare(`UPDATE fits SET status = @status, review_comment = @comment, reviewed_by = @by,
        reviewed_at = @now WHERE id = @id AND status = 'draft'`),
    };
  }

  get(id: number): StoredFit {
    const row = this.q.get.get(id) as FitRow | undefined;
    if (!row) throw new NotFoundError('fit', id);
    return toFit(row);
  }

  /** The same object as get(id), as JSON text. */
  getJson(id: number): string {
    const row = this.q.get.get(id) as FitRow | undefined;
    if (!row) throw new NotFoundError('fit', id);
    return fitJson(row);
  }

  /** getJson(id) as UTF-8 bytes with their digest, from memory when already read. */
  getText(id: number): ReadyText {
    const hit = this.texts.get(id);
    if (hit) return hit;
    const text = readyText(this.getJson(id));
    this.texts.set(id, text);
    return text;
  }

  listByVessel(vesselId: number, limit: number, offset: number): { items: StoredFit[]; total: number } {
    return {
      items: (this.q.byVessel.all(vesselId, limit, offset) as FitRow[]).map(toFit),
      total: this.q.countVessel.get(vesselId) as number,
    };
  }

  listByTest(testId: number): StoredFit[] {
    return (this.q.byTest.all(testId) as FitRow[]).map(toFit);
  }

  /** The first fit of a pending test; marks the test analysed in the same transaction. */
  storeFirst(actor: Actor, testId: number, detected: Record<string, unknown>, fit: NewFit): StoredFit {
    return this.c.db
      .transaction(() => {
        this.tests.markAnalysed(testId, detected);
        return this.insert(actor, testId, fit, 'fit.create');
      })
      .immediate();
  }

  /** A new draft fit for the same test; the old one is marked superseded and kept. */
  refit(actor: Actor, oldId: number, fit: NewFit): StoredFit {
    return this.c.db
      .transaction(() => {
        const old = this.get(oldId);
        if (old.supersededBy !== null) throw new ConflictError(`fit ${oldId} is already superseded by fit ${old.supersededBy}`);
        const created = this.insert(actor, old.testId, fit, 'fit.refit');
        this.q.supersede.run(created.id, oldId);
        this.texts.delete(oldId);
        const after = this.get(oldId);
        this.c.audit.append(actor, this.c.now(), {
          action: 'fit.supersede',
          entityType: 'fit',
          entityId: oldId,
          before: auditView(old),
          after: auditView(after),
        });
        return created;
      })
      .immediate();
  }

  review(actor: Actor, id: number, decision: 'approved' | 'rejected', comment: string | null): StoredFit {
    return this.c.db
      .transaction(() => {
        const before = this.get(id);
        if (before.status !== 'draft') throw new ConflictError(`fit ${id} was already ${before.status}`);
        if (before.supersededBy !== null) throw new ConflictError(`fit ${id} is superseded by fit ${before.supersededBy}; review that one`);
        const now = this.c.now();
        this.q.review.run({ status: decision, comment, by: actor.id, now, id });
        this.texts.delete(id);
        const after = this.get(id);
        this.c.audit.append(actor, now, {
          action: decision === 'approved' ? 'fit.approve' : 'fit.reject',
          entityType: 'fit',
          entityId: id,
          before: auditView(before),
          after: auditView(after),
        });
        return after;
      })
      .immediate();
  }

  private insert(actor: Actor, testId: number, fit: NewFit, action: string): StoredFit {
    const test = this.tests.get(testId);
    const now = this.c.now();
    const engineVersion = typeof fit.result.engineVersion === 'string' ? fit.result.engineVersion : 'unknown';
    const id = Number(
      this.q.insert.run({
        testId,
        vesselId: test.vesselId,
        outletId: test.outletId,
        settings: JSON.stringify(fit.settings),
        vesselSpec: JSON.stringify(fit.vessel),
        result: JSON.stringify(fit.result),
        engineVersion,
        cda: numberAt(fit.result, 'effectiveAreaM2'),
        cd: numberAt(fit.result, 'dischargeCoefficient'),
        cdaU: numberAt(fit.result, 'effectiveAreaM2', 'standardUncertainty'),
        cdU: numberAt(fit.result, 'dischargeCoefficient', 'standardUncertainty'),
        createdBy: actor.id,
        now,
      }).lastInsertRowid,
    );
    const stored = this.get(id);
    this.c.audit.append(actor, now, { action, entityType: 'fit', entityId: id, after: auditView(stored) });
    return stored;
  }
}
