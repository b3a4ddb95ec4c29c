import type { FitJson } from '../core/analysis-contract.js';
import { createHash } from 'node:crypto';
import type { Actor } from './audit.js';
import { canonicalJson } from './canonical-json.js';
import { parse, type StoreContext } from './context.js';
import { ConflictError, ForbiddenError, NotFoundError } from './errors.js';
import { ReadCache, readyText, type ReadyText } from './read-cache.js';
import type { SiteRepo } from './sites.js';
import type { TestRepo } from './tests.js';

/**
 * The API's fit object as JSON text, spliced from the stored JSON columns without parsing them:
 * the hot read path skips JSON.parse and re-serialising a result of tens of KiB. The stored texts
 * were written by JSON.stringify, so they are valid JSON. Must match toFit (a store test checks).
 */
function fitJson(r: FitRow): string {
  const review = r.reviewed_at ? JSON.stringify(reviewOf(r)) : 'null';
  return (
    `{"id":${r.id},"testId":${r.test_id},"vesselId":${r.vessel_id},"outletId":${JSON.stringify(r.outlet_id)},` +
    `"settings":${r.settings},"vessel":${r.vessel_spec},"result":${r.result},"engineVersion":${JSON.stringify(r.engine_version)},` +
    `"status":${JSON.stringify(r.status)},"supersededBy":${JSON.stringify(r.superseded_by)},"review":${review},` +
    `"createdBy":${JSON.stringify(r.created_by)},"createdAt":${JSON.stringify(r.created_at)}}`
  );
}

const SELECT =
  'SELECT f.*, t.created_by AS test_created_by FROM fits f JOIN drain_tests t ON t.id = f.test_id';

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
  /** selfReview: approved by the person who uploaded the test or asked for this fit (derived on read). */
  review: {
    comment: string | null;
    by: number | null;
    at: string | null;
    selfReview: boolean;
  } | null;
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
  /** Who uploaded the test (joined in, not a column of fits). */
  test_created_by: number | null;
}

/** Four eyes: the reviewer is the uploader of the test or the requester of this fit. */
function isSelfReview(r: Pick<FitRow, 'reviewed_by' | 'created_by' | 'test_created_by'>): boolean {
  return (
    r.reviewed_by !== null &&
    (r.reviewed_by === r.created_by || r.reviewed_by === r.test_created_by)
  );
}

function reviewOf(r: FitRow): StoredFit['review'] {
  return r.reviewed_at
    ? {
        comment: r.review_comment,
        by: r.reviewed_by,
        at: r.reviewed_at,
        selfReview: r.status === 'approved' && isSelfReview(r),
      }
    : null;
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
    review: reviewOf(r),
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

function numberAt(
  obj: Record<string, unknown>,
  key: string,
  field: 'value' | 'standardUncertainty' = 'value',
): number | null {
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
    private readonly sites: SiteRepo,
  ) {
    const db = c.db;
    this.texts = new ReadCache<ReadyText>(
      c.foreign,
      FIT_CACHE_BYTES,
      (t) => t.body.byteLength + 64,
    );
    this.q = {
      insert:
        db.prepare(`INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd,
        cda_u, cd_u, status, created_by, created_at) VALUES (@testId, @vesselId, @outletId, @settings, @vesselSpec, @result, @engineVersion,
        @cda, @cd, @cdaU, @cdU, 'draft', @createdBy, @now)`),
      get: db.prepare(`${SELECT} WHERE f.id = ?`),
      byVessel: db.prepare(`${SELECT} WHERE f.vessel_id = ? ORDER BY f.id DESC LIMIT ? OFFSET ?`),
      countVessel: db.prepare('SELECT count(*) FROM fits WHERE vessel_id = ?').pluck(),
      byTest: db.prepare(`${SELECT} WHERE f.test_id = ? ORDER BY f.id`),
      inForceOfTest: db
        .prepare(
          `SELECT id FROM fits WHERE test_id = ? AND id <> ? AND superseded_by IS NULL ORDER BY id`,
        )
        .pluck(),
      supersede: db.prepare(
        'UPDATE fits SET superseded_by = ? WHERE id = ? AND superseded_by IS NULL',
      ),
      review:
        db.prepare(`UPDATE fits SET status = @status, review_comment = @comment, reviewed_by = @by,
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

  listByVessel(
    vesselId: number,
    limit: number,
    offset: number,
  ): { items: StoredFit[]; total: number } {
    return {
      items: (this.q.byVessel.all(vesselId, limit, offset) as FitRow[]).map(toFit),
      total: this.q.countVessel.get(vesselId) as number,
    };
  }

  listByTest(testId: number): StoredFit[] {
    return (this.q.byTest.all(testId) as FitRow[]).map(toFit);
  }

  /**
   * The first fit of a pending test; marks the test analysed in the same transaction, dated from
   * `logDate` (the fitted window's first reading) when no date was stated.
   */
  storeFirst(
    actor: Actor,
    testId: number,
    detected: Record<string, unknown>,
    fit: NewFit,
    logDate: string | null = null,
  ): StoredFit {
    return this.c.db
      .transaction(() => {
        this.tests.markAnalysed(testId, detected, logDate);
        return this.insert(actor, testId, fit, 'fit.create');
      })
      .immediate();
  }

  /**
   * A new draft fit for the same test. An approved fit stays in force beside it until the draft is
   * approved (review); a draft or rejected fit refitted is superseded at once (nothing in force changes).
   */
  refit(actor: Actor, oldId: number, fit: NewFit): StoredFit {
    return this.c.db
      .transaction(() => {
        const old = this.get(oldId);
        if (old.supersededBy !== null)
          throw new ConflictError(`fit ${oldId} is already superseded by fit ${old.supersededBy}`);
        const created = this.insert(actor, old.testId, fit, 'fit.refit');
        if (old.status !== 'approved') this.supersede(actor, oldId, created.id);
        return created;
      })
      .immediate();
  }

  private supersede(actor: Actor, oldId: number, byId: number): void {
    const before = this.get(oldId);
    this.q.supersede.run(byId, oldId);
    this.texts.delete(oldId);
    this.c.audit.append(actor, this.c.now(), {
      action: 'fit.supersede',
      entityType: 'fit',
      entityId: oldId,
      before: auditView(before),
      after: auditView(this.get(oldId)),
    });
  }

  /**
   * Approves or rejects a draft. Four eyes: the person who uploaded the test or asked for this fit
   * may not approve it unless the site allows self-review (then the approval is marked). Approving
   * supersedes, in the same transaction, every other fit of the test still standing (the approved
   * one it replaces, other drafts); rejecting changes nothing else.
   */
  review(
    actor: Actor,
    id: number,
    decision: 'approved' | 'rejected',
    comment: string | null,
  ): StoredFit {
    return this.c.db
      .transaction(() => {
        const before = this.get(id);
        if (before.status !== 'draft')
          throw new ConflictError(`fit ${id} was already ${before.status}`);
        if (before.supersededBy !== null)
          throw new ConflictError(
            `fit ${id} is superseded by fit ${before.supersededBy}; review that one`,
          );
        const test = this.tests.get(before.testId);
        const self =
          decision === 'approved' &&
          isSelfReview({
            reviewed_by: actor.id,
            created_by: before.createdBy,
            test_created_by: test.createdBy,
          });
        if (self && !this.sites.selfReviewAllowedForVessel(before.vesselId)) {
          const what =
            actor.id === test.createdBy ? `uploaded test ${test.id}` : `asked for fit ${id}`;
          throw new ForbiddenError(
            `four eyes: ${actor.name} ${what} and may not approve it; another engineer must (an admin may allow self-review for the site)`,
          );
        }
        const now = this.c.now();
        this.q.review.run({ status: decision, comment, by: actor.id, now, id });
        this.texts.delete(id);
        const after = this.get(id);
        this.c.audit.append(actor, now, {
          action: decision === 'approved' ? 'fit.approve' : 'fit.reject',
          entityType: 'fit',
          entityId: id,
          before: auditView(before),
          after: self ? { ...auditView(after), selfReview: true } : auditView(after),
        });
        if (decision === 'approved') {
          for (const other of this.q.inForceOfTest.all(before.testId, id) as number[])
            this.supersede(actor, other, id);
        }
        return this.get(id);
      })
      .immediate();
  }

  private insert(actor: Actor, testId: number, fit: NewFit, action: string): StoredFit {
    const test = this.tests.get(testId);
    const now = this.c.now();
    const engineVersion =
      typeof fit.result.engineVersion === 'string' ? fit.result.engineVersion : 'unknown';
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
    this.c.audit.append(actor, now, {
      action,
      entityType: 'fit',
      entityId: id,
      after: auditView(stored),
    });
    return stored;
  }
}
