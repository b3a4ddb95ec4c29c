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

const INSERT = `INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd,
  cda_u, cd_u, status, created_by, created_at) VALUES (@testId, @vesselId, @outletId, @settings, @vesselSpec, @result, @engineVersion,
  @cda, @cd, @cdaU, @cdU, 'draft', @createdBy, @now) RETURNING id`;

/** Fits: stored as drafts, reviewed once, superseded by refits, never overwritten or deleted. */
export class FitRepo {
  /**
   * GET /api/fits/:id answers by id. A fit's row changes only by review and supersession (both
   * here, both drop the entry, in the transaction and again after its commit); other
   * connections' commits empty the cache (ForeignWrites).
   */
  private readonly texts: ReadCache<ReadyText>;

  constructor(
    private readonly c: StoreContext,
    private readonly tests: TestRepo,
    private readonly sites: SiteRepo,
  ) {
    this.texts = new ReadCache<ReadyText>(
      c.foreign,
      FIT_CACHE_BYTES,
      (t) => t.body.byteLength + 64,
    );
  }

  private async row(id: number): Promise<FitRow> {
    const row = await this.c.sql.get<FitRow>(`${SELECT} WHERE f.id = ?`, [id]);
    if (!row) throw new NotFoundError('fit', id);
    return row;
  }

  async get(id: number): Promise<StoredFit> {
    return toFit(await this.row(id));
  }

  /** The same object as get(id), as JSON text. */
  async getJson(id: number): Promise<string> {
    return fitJson(await this.row(id));
  }

  /** getJson(id) as UTF-8 bytes with their digest, from memory when already read. */
  async getText(id: number): Promise<ReadyText> {
    return this.texts.read(id, async () => readyText(await this.getJson(id)));
  }

  async listByVessel(
    vesselId: number,
    limit: number,
    offset: number,
  ): Promise<{ items: StoredFit[]; total: number }> {
    const rows = await this.c.sql.all<FitRow>(
      `${SELECT} WHERE f.vessel_id = ? ORDER BY f.id DESC LIMIT ? OFFSET ?`,
      [vesselId, limit, offset],
    );
    return {
      items: rows.map(toFit),
      total: Number(
        await this.c.sql.value('SELECT count(*) FROM fits WHERE vessel_id = ?', [vesselId]),
      ),
    };
  }

  async listByTest(testId: number): Promise<StoredFit[]> {
    return (
      await this.c.sql.all<FitRow>(`${SELECT} WHERE f.test_id = ? ORDER BY f.id`, [testId])
    ).map(toFit);
  }

  /**
   * The first fit of a pending test; marks the test analysed in the same transaction, dated from
   * `logDate` (the fitted window's first reading) when no date was stated.
   */
  async storeFirst(
    actor: Actor,
    testId: number,
    detected: Record<string, unknown>,
    fit: NewFit,
    logDate: string | null = null,
  ): Promise<StoredFit> {
    const stored = await this.c.sql.tx(async () => {
      await this.tests.markAnalysed(testId, detected, logDate);
      return this.insert(actor, testId, fit, 'fit.create');
    });
    this.tests.dropPages(); // committed: see ReadCache
    return stored;
  }

  /**
   * A new draft fit for the same test. An approved fit stays in force beside it until the draft is
   * approved (review); a draft or rejected fit refitted is superseded at once (nothing in force changes).
   */
  async refit(actor: Actor, oldId: number, fit: NewFit): Promise<StoredFit> {
    const created = await this.c.sql.tx(async () => {
      const old = await this.get(oldId);
      if (old.supersededBy !== null)
        throw new ConflictError(`fit ${oldId} is already superseded by fit ${old.supersededBy}`);
      const created = await this.insert(actor, old.testId, fit, 'fit.refit');
      if (old.status !== 'approved') await this.supersede(actor, oldId, created.id);
      return created;
    });
    this.texts.delete(oldId); // committed: see ReadCache
    return created;
  }

  private async supersede(actor: Actor, oldId: number, byId: number): Promise<void> {
    const before = await this.get(oldId);
    await this.c.sql.run(
      'UPDATE fits SET superseded_by = ? WHERE id = ? AND superseded_by IS NULL',
      [byId, oldId],
    );
    this.texts.delete(oldId);
    await this.c.audit.append(actor, this.c.now(), {
      action: 'fit.supersede',
      entityType: 'fit',
      entityId: oldId,
      before: auditView(before),
      after: auditView(await this.get(oldId)),
    });
  }

  /**
   * Approves or rejects a draft. Four eyes: the person who uploaded the test or asked for this fit
   * may not approve it unless the site allows self-review (then the approval is marked). Approving
   * supersedes, in the same transaction, every other fit of the test still standing (the approved
   * one it replaces, other drafts); rejecting changes nothing else.
   */
  async review(
    actor: Actor,
    id: number,
    decision: 'approved' | 'rejected',
    comment: string | null,
  ): Promise<StoredFit> {
    const dropped: number[] = [id];
    const out = await this.c.sql.tx(async () => {
      const before = await this.get(id);
      if (before.status !== 'draft')
        throw new ConflictError(`fit ${id} was already ${before.status}`);
      if (before.supersededBy !== null)
        throw new ConflictError(
          `fit ${id} is superseded by fit ${before.supersededBy}; review that one`,
        );
      const test = await this.tests.get(before.testId);
      const self =
        decision === 'approved' &&
        isSelfReview({
          reviewed_by: actor.id,
          created_by: before.createdBy,
          test_created_by: test.createdBy,
        });
      if (self && !(await this.sites.selfReviewAllowedForVessel(before.vesselId))) {
        const what =
          actor.id === test.createdBy ? `uploaded test ${test.id}` : `asked for fit ${id}`;
        throw new ForbiddenError(
          `four eyes: ${actor.name} ${what} and may not approve it; another engineer must (an admin may allow self-review for the site)`,
        );
      }
      const now = this.c.now();
      await this.c.sql.run(
        `UPDATE fits SET status = @status, review_comment = @comment, reviewed_by = @by,
        reviewed_at = @now WHERE id = @id AND status = 'draft'`,
        { status: decision, comment, by: actor.id, now, id },
      );
      this.texts.delete(id);
      const after = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: decision === 'approved' ? 'fit.approve' : 'fit.reject',
        entityType: 'fit',
        entityId: id,
        before: auditView(before),
        after: self ? { ...auditView(after), selfReview: true } : auditView(after),
      });
      if (decision === 'approved') {
        const others = await this.c.sql.all<{ id: number }>(
          'SELECT id FROM fits WHERE test_id = ? AND id <> ? AND superseded_by IS NULL ORDER BY id',
          [before.testId, id],
        );
        for (const other of others) {
          dropped.push(other.id);
          await this.supersede(actor, other.id, id);
        }
      }
      return this.get(id);
    });
    for (const d of dropped) this.texts.delete(d); // committed: see ReadCache
    return out;
  }

  private async insert(
    actor: Actor,
    testId: number,
    fit: NewFit,
    action: string,
  ): Promise<StoredFit> {
    const test = await this.tests.get(testId);
    const now = this.c.now();
    const engineVersion =
      typeof fit.result.engineVersion === 'string' ? fit.result.engineVersion : 'unknown';
    const id = Number(
      await this.c.sql.value(INSERT, {
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
      }),
    );
    const stored = await this.get(id);
    await this.c.audit.append(actor, now, {
      action,
      entityType: 'fit',
      entityId: id,
      after: auditView(stored),
    });
    return stored;
  }
}
