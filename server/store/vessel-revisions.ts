import type { StoreContext } from './context.js';
import { NotFoundError } from './errors.js';

/** One saved revision of a vessel file (migration 007: kept by triggers, never changed). */
export interface VesselRevisionInfo {
  revision: number;
  savedAt: string;
  /** Who saved it, from the audit log's vessel entry (null when the entry is missing). */
  savedBy: string | null;
  /** The fits computed with this revision, oldest first. */
  fitIds: number[];
}

export interface VesselRevision {
  vesselId: number;
  revision: number;
  savedAt: string;
  spec: Record<string, unknown>;
}

/** Earlier vessel files and the revision each fit used (asynchronous, on `c.sql` only). */
export class VesselRevisionRepo {
  constructor(private readonly c: StoreContext) {}

  /** Every revision of a vessel, newest first. */
  async list(vesselId: number): Promise<VesselRevisionInfo[]> {
    const rows = await this.c.sql.all<{ revision: number; saved_at: string }>(
      'SELECT revision, saved_at FROM vessel_revisions WHERE vessel_id = ? ORDER BY revision DESC',
      [vesselId],
    );
    if (rows.length === 0) throw new NotFoundError('vessel', vesselId);
    const fits = await this.c.sql.all<{ fit_id: number; revision: number }>(
      'SELECT fit_id, revision FROM fit_vessel_revisions WHERE vessel_id = ? ORDER BY fit_id',
      [vesselId],
    );
    // The audit entries of a vessel are few (one per save): read them and take each revision's saver.
    const entries = await this.c.sql.all<{ actor_name: string; after: string | null }>(
      `SELECT actor_name, after FROM audit_log WHERE entity_type = 'vessel' AND entity_id = ?
       AND action IN ('vessel.create', 'vessel.update') ORDER BY seq`,
      [String(vesselId)],
    );
    const saver = new Map<number, string>();
    for (const e of entries) {
      const rev =
        e.after === null ? undefined : (JSON.parse(e.after) as { revision?: unknown }).revision;
      if (typeof rev === 'number') saver.set(rev, e.actor_name);
    }
    return rows.map((r) => ({
      revision: Number(r.revision),
      savedAt: r.saved_at,
      savedBy: saver.get(Number(r.revision)) ?? null,
      fitIds: fits
        .filter((f) => Number(f.revision) === Number(r.revision))
        .map((f) => Number(f.fit_id)),
    }));
  }

  /** One revision's vessel file, as saved. */
  async get(vesselId: number, revision: number): Promise<VesselRevision> {
    const row = await this.c.sql.get<{ spec: string; saved_at: string }>(
      'SELECT spec, saved_at FROM vessel_revisions WHERE vessel_id = ? AND revision = ?',
      [vesselId, revision],
    );
    if (!row) throw new NotFoundError(`revision ${revision} of vessel`, vesselId);
    return { vesselId, revision, savedAt: row.saved_at, spec: JSON.parse(row.spec) };
  }

  /** The vessel revision a fit was computed with. */
  async ofFit(fitId: number): Promise<{ vesselId: number; revision: number }> {
    const row = await this.c.sql.get<{ vessel_id: number; revision: number }>(
      'SELECT vessel_id, revision FROM fit_vessel_revisions WHERE fit_id = ?',
      [fitId],
    );
    if (!row) throw new NotFoundError('fit', fitId);
    return { vesselId: Number(row.vessel_id), revision: Number(row.revision) };
  }
}
