import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { NotFoundError } from './errors.js';

export interface Site {
  id: number;
  name: string;
  /** Four eyes waived: the uploader or refit requester may approve (every such approval is marked). */
  selfReviewAllowed: boolean;
  createdAt: string;
}

interface SiteRow {
  id: number;
  name: string;
  self_review_allowed: number;
  created_at: string;
}
const toSite = (r: SiteRow): Site => ({
  id: r.id,
  name: r.name,
  selfReviewAllowed: r.self_review_allowed === 1,
  createdAt: r.created_at,
});

/** What a record belongs to, for site limits: the site of a vessel, test, fit or outlet. */
export type SiteOwner = 'vessel' | 'test' | 'fit' | 'outlet';

/** Sites (created with their first vessel or named for a person) and their settings (migration 003). */
export class SiteRepo {
  private readonly q;

  constructor(private readonly c: StoreContext) {
    const db = c.db;
    this.q = {
      list: db.prepare('SELECT * FROM sites ORDER BY name'),
      byName: db.prepare('SELECT * FROM sites WHERE name = ?'),
      add: db.prepare('INSERT INTO sites (name, created_at) VALUES (?, ?)'),
      setSelfReview: db.prepare('UPDATE sites SET self_review_allowed = ? WHERE id = ?'),
      vessel: db
        .prepare('SELECT s.name FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?')
        .pluck(),
      test: db
        .prepare(
          'SELECT s.name FROM drain_tests t JOIN vessels v ON v.id = t.vessel_id JOIN sites s ON s.id = v.site_id WHERE t.id = ?',
        )
        .pluck(),
      fit: db
        .prepare(
          'SELECT s.name FROM fits f JOIN vessels v ON v.id = f.vessel_id JOIN sites s ON s.id = v.site_id WHERE f.id = ?',
        )
        .pluck(),
      outlet: db
        .prepare(
          'SELECT s.name FROM outlets o JOIN vessels v ON v.id = o.vessel_id JOIN sites s ON s.id = v.site_id WHERE o.id = ?',
        )
        .pluck(),
      selfReviewOfVessel: db
        .prepare(
          'SELECT s.self_review_allowed FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?',
        )
        .pluck(),
    };
  }

  list(): Site[] {
    return (this.q.list.all() as SiteRow[]).map(toSite);
  }

  get(name: string): Site {
    const r = this.q.byName.get(name) as SiteRow | undefined;
    if (!r) throw new NotFoundError('site', name);
    return toSite(r);
  }

  /** The site's id, created when missing (call inside a write transaction). */
  ensure(name: string): number {
    const r = this.q.byName.get(name) as SiteRow | undefined;
    return r ? r.id : Number(this.q.add.run(name, this.c.now()).lastInsertRowid);
  }

  /** The site a record belongs to; NotFoundError when there is no such record. */
  siteOf(kind: SiteOwner, id: number): string {
    const name = this.q[kind].get(id) as string | undefined;
    if (name === undefined) throw new NotFoundError(kind, id);
    return name;
  }

  selfReviewAllowedForVessel(vesselId: number): boolean {
    return this.q.selfReviewOfVessel.get(vesselId) === 1;
  }

  setSelfReview(actor: Actor, name: string, allowed: boolean): Site {
    return this.c.db
      .transaction(() => {
        const before = this.get(name);
        this.q.setSelfReview.run(allowed ? 1 : 0, before.id);
        const after = this.get(name);
        this.c.audit.append(actor, this.c.now(), {
          action: 'site.settings',
          entityType: 'site',
          entityId: before.id,
          before,
          after,
        });
        return after;
      })
      .immediate();
  }
}
