/**
 * Joint fits of connected vessels kept as records (migration 009): the system file and every log
 * exactly as received, the settings, the result (the one fit-result shape, JointFitResult) and the
 * thinned curves for charts; draft → approved | rejected once, with four eyes as for single fits.
 * Asynchronous on `c.sql` only (issue 14), audited in the same transaction as each change.
 */
import { createHash } from 'node:crypto';
import type { JointFitResult } from '../core/fit-result/schema.js';
import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { ConflictError, ForbiddenError, NotFoundError } from './errors.js';

export type JointFitStatus = 'draft' | 'approved' | 'rejected';

export interface JointFitFileIn {
  /** 'system' for the system file; 'level' a vessel's level log; 'inflow' a logged inflow into a vessel. */
  role: 'system' | 'level' | 'inflow';
  /** The vessel's id in the system file ('' for the system file). */
  vessel: string;
  fileName: string;
  bytes: Uint8Array;
}

export interface NewJointFit {
  site: string;
  systemName: string;
  settings: Record<string, unknown>;
  result: JointFitResult;
  drawing: unknown;
  notes: string | null;
  files: JointFitFileIn[];
}

export interface JointFitFile {
  role: JointFitFileIn['role'];
  vessel: string;
  fileName: string;
  sha256: string;
  size: number;
}

export interface JointFitSummary {
  id: number;
  site: string;
  systemName: string;
  status: JointFitStatus;
  engineVersion: string;
  createdAt: string;
  createdBy: string | null;
  reviewedBy: string | null;
  reviewedAt: string | null;
}

export interface StoredJointFit extends JointFitSummary {
  createdById: number | null;
  settings: Record<string, unknown>;
  result: JointFitResult;
  drawing: unknown;
  notes: string | null;
  files: JointFitFile[];
  /** selfReview: approved by the person who stored the fit (allowed by the site's setting). */
  review: {
    decision: 'approved' | 'rejected';
    comment: string | null;
    by: string | null;
    byId: number | null;
    at: string;
    selfReview: boolean;
  } | null;
}

interface Row {
  id: number;
  site: string;
  system_name: string;
  settings: string;
  result: string;
  drawing: string;
  engine_version: string;
  notes: string | null;
  status: JointFitStatus;
  created_by: number | null;
  created_by_name: string | null;
  created_at: string;
  review_comment: string | null;
  reviewed_by: number | null;
  reviewed_by_name: string | null;
  reviewed_at: string | null;
}

const SELECT = `SELECT j.id, s.name AS site, j.system_name, j.settings, j.result, j.drawing,
  j.engine_version, j.notes, j.status, j.created_by, cu.name AS created_by_name, j.created_at,
  j.review_comment, j.reviewed_by, ru.name AS reviewed_by_name, j.reviewed_at
  FROM joint_fits j JOIN sites s ON s.id = j.site_id
  LEFT JOIN users cu ON cu.id = j.created_by LEFT JOIN users ru ON ru.id = j.reviewed_by`;

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

function summary(r: Row): JointFitSummary {
  return {
    id: Number(r.id),
    site: r.site,
    systemName: r.system_name,
    status: r.status,
    engineVersion: r.engine_version,
    createdAt: r.created_at,
    createdBy: r.created_by_name,
    reviewedBy: r.reviewed_by_name,
    reviewedAt: r.reviewed_at,
  };
}

/** What the audit log keeps of a joint fit: everything but the result, which it keeps as a hash. */
function auditView(f: StoredJointFit) {
  return {
    site: f.site,
    systemName: f.systemName,
    status: f.status,
    settings: f.settings,
    resultSha256: sha256(new TextEncoder().encode(JSON.stringify(f.result))),
    engineVersion: f.engineVersion,
    files: f.files.map((x) => ({
      role: x.role,
      vessel: x.vessel,
      fileName: x.fileName,
      sha256: x.sha256,
    })),
    review: f.review,
  };
}

export class JointFitRepo {
  constructor(private readonly c: StoreContext) {}

  /** Stores a new draft with its files (identical bytes are kept once). */
  async create(actor: Actor, fit: NewJointFit): Promise<StoredJointFit> {
    return this.c.sql.tx(async () => {
      const now = this.c.now();
      await this.c.sql.run(
        'INSERT INTO sites (name, created_at) VALUES (?, ?) ON CONFLICT (name) DO NOTHING',
        [fit.site, now],
      );
      const siteId = await this.c.sql.value<number>('SELECT id FROM sites WHERE name = ?', [
        fit.site,
      ]);
      const row = await this.c.sql.get<{ id: number }>(
        `INSERT INTO joint_fits (site_id, system_name, settings, result, drawing, engine_version,
          notes, status, created_by, created_at)
         VALUES (@siteId, @systemName, @settings, @result, @drawing, @engineVersion, @notes,
          'draft', @createdBy, @now) RETURNING id`,
        {
          siteId: siteId!,
          systemName: fit.systemName,
          settings: JSON.stringify(fit.settings),
          result: JSON.stringify(fit.result),
          drawing: JSON.stringify(fit.drawing),
          engineVersion: fit.result.engineVersion,
          notes: fit.notes,
          createdBy: actor.id,
          now,
        },
      );
      const id = Number(row!.id);
      for (const f of fit.files) {
        const hash = sha256(f.bytes);
        await this.c.sql.run(
          `INSERT INTO joint_fit_bytes (sha256, size, bytes, created_at) VALUES (?, ?, ?, ?)
           ON CONFLICT (sha256) DO NOTHING`,
          [
            hash,
            f.bytes.byteLength,
            Buffer.from(f.bytes.buffer, f.bytes.byteOffset, f.bytes.byteLength),
            now,
          ],
        );
        await this.c.sql.run(
          `INSERT INTO joint_fit_files (joint_fit_id, role, vessel, file_name, sha256)
           VALUES (?, ?, ?, ?, ?)`,
          [id, f.role, f.vessel, f.fileName, hash],
        );
      }
      const created = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: 'joint-fit.create',
        entityType: 'joint-fit',
        entityId: id,
        after: auditView(created),
      });
      return created;
    });
  }

  async get(id: number): Promise<StoredJointFit> {
    const r = await this.c.sql.get<Row>(`${SELECT} WHERE j.id = ?`, [id]);
    if (!r) throw new NotFoundError('joint fit', id);
    const files = await this.c.sql.all<{
      role: JointFitFile['role'];
      vessel: string;
      file_name: string;
      sha256: string;
      size: number;
    }>(
      `SELECT f.role, f.vessel, f.file_name, f.sha256, b.size FROM joint_fit_files f
       JOIN joint_fit_bytes b ON b.sha256 = f.sha256 WHERE f.joint_fit_id = ?
       ORDER BY CASE f.role WHEN 'system' THEN 0 WHEN 'level' THEN 1 ELSE 2 END, f.vessel`,
      [id],
    );
    return {
      ...summary(r),
      createdById: r.created_by === null ? null : Number(r.created_by),
      settings: JSON.parse(r.settings) as Record<string, unknown>,
      result: JSON.parse(r.result) as JointFitResult,
      drawing: JSON.parse(r.drawing) as unknown,
      notes: r.notes,
      files: files.map((f) => ({
        role: f.role,
        vessel: f.vessel,
        fileName: f.file_name,
        sha256: f.sha256,
        size: Number(f.size),
      })),
      review:
        r.status === 'draft' || r.reviewed_at === null
          ? null
          : {
              decision: r.status,
              comment: r.review_comment,
              by: r.reviewed_by_name,
              byId: r.reviewed_by === null ? null : Number(r.reviewed_by),
              at: r.reviewed_at,
              selfReview:
                r.status === 'approved' && r.reviewed_by !== null && r.reviewed_by === r.created_by,
            },
    };
  }

  /** The site a joint fit belongs to (for site limits); NotFoundError when there is none. */
  async siteOf(id: number): Promise<string> {
    const site = await this.c.sql.value<string>(
      'SELECT s.name FROM joint_fits j JOIN sites s ON s.id = j.site_id WHERE j.id = ?',
      [id],
    );
    if (site === undefined) throw new NotFoundError('joint fit', id);
    return site;
  }

  /**
   * Newest first; `sites` null = every site; `systemName` narrows to one system. Values are
   * always bound: only the number of site placeholders depends on the list.
   */
  async list(opts: {
    sites: readonly string[] | null;
    systemName?: string;
    limit?: number;
  }): Promise<JointFitSummary[]> {
    if (opts.sites !== null && opts.sites.length === 0) return [];
    const siteTest =
      opts.sites === null ? '' : ` AND s.name IN (${opts.sites.map(() => '?').join(', ')})`;
    const rows = await this.c.sql.all<Row>(
      `${SELECT} WHERE (CAST(? AS TEXT) IS NULL OR j.system_name = ?)${siteTest} ORDER BY j.id DESC LIMIT ?`,
      [opts.systemName ?? null, opts.systemName ?? null, ...(opts.sites ?? []), opts.limit ?? 100],
    );
    return rows.map(summary);
  }

  /** The bytes of one stored file of a joint fit. */
  async file(
    id: number,
    role: JointFitFile['role'],
    vessel: string,
  ): Promise<{ fileName: string; bytes: Uint8Array }> {
    const r = await this.c.sql.get<{ file_name: string; bytes: Uint8Array }>(
      `SELECT f.file_name, b.bytes FROM joint_fit_files f JOIN joint_fit_bytes b ON b.sha256 = f.sha256
       WHERE f.joint_fit_id = ? AND f.role = ? AND f.vessel = ?`,
      [id, role, vessel],
    );
    if (!r) throw new NotFoundError(`${role} file of joint fit ${id}`, vessel || 'system');
    return { fileName: r.file_name, bytes: new Uint8Array(r.bytes) };
  }

  /**
   * Approves or rejects a draft, once. Four eyes, the rule of single fits (store/fits.ts): the
   * person who stored the fit may not approve it unless its site allows self-review; such an
   * approval is then marked in the record and in the audit log.
   */
  async review(
    actor: Actor,
    id: number,
    decision: 'approved' | 'rejected',
    comment: string | null,
  ): Promise<StoredJointFit> {
    return this.c.sql.tx(async () => {
      const before = await this.get(id);
      if (before.status !== 'draft')
        throw new ConflictError(`joint fit ${id} was already ${before.status}`);
      const self = decision === 'approved' && actor.id !== null && actor.id === before.createdById;
      if (self) {
        const allowed = await this.c.sql.value<number>(
          'SELECT self_review_allowed FROM sites WHERE name = ?',
          [before.site],
        );
        if (Number(allowed) !== 1)
          throw new ForbiddenError(
            `four eyes: ${actor.name} stored joint fit ${id} and may not approve it; another engineer must (an admin may allow self-review for the site)`,
          );
      }
      const now = this.c.now();
      const { changes } = await this.c.sql.run(
        `UPDATE joint_fits SET status = ?, review_comment = ?, reviewed_by = ?, reviewed_at = ?
         WHERE id = ? AND status = 'draft'`,
        [decision, comment, actor.id, now, id],
      );
      // another reviewer's transaction got there first (PostgreSQL reads before it locks the row)
      if (changes !== 1) throw new ConflictError(`joint fit ${id} was reviewed meanwhile`);
      const after = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: decision === 'approved' ? 'joint-fit.approve' : 'joint-fit.reject',
        entityType: 'joint-fit',
        entityId: id,
        before: auditView(before),
        after: self ? { ...auditView(after), selfReview: true } : auditView(after),
      });
      return after;
    });
  }
}
