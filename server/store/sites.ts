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
  selfReviewAllowed: Number(r.self_review_allowed) === 1,
  createdAt: r.created_at,
});

/** What a record belongs to, for site limits: the site of a vessel, test, fit or outlet. */
export type SiteOwner = 'vessel' | 'test' | 'fit' | 'outlet';

/** The site's name of each kind of record, by the record's id. */
const SITE_OF: Record<SiteOwner, string> = {
  vessel: 'SELECT s.name FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?',
  test: 'SELECT s.name FROM drain_tests t JOIN vessels v ON v.id = t.vessel_id JOIN sites s ON s.id = v.site_id WHERE t.id = ?',
  fit: 'SELECT s.name FROM fits f JOIN vessels v ON v.id = f.vessel_id JOIN sites s ON s.id = v.site_id WHERE f.id = ?',
  outlet:
    'SELECT s.name FROM outlets o JOIN vessels v ON v.id = o.vessel_id JOIN sites s ON s.id = v.site_id WHERE o.id = ?',
};

/** Sites (created with their first vessel or named for a person) and their settings (migration 003). */
export class SiteRepo {
  constructor(private readonly c: StoreContext) {}

  async list(): Promise<Site[]> {
    return (await this.c.sql.all<SiteRow>('SELECT * FROM sites ORDER BY name')).map(toSite);
  }

  async get(name: string): Promise<Site> {
    const r = await this.c.sql.get<SiteRow>('SELECT * FROM sites WHERE name = ?', [name]);
    if (!r) throw new NotFoundError('site', name);
    return toSite(r);
  }

  /** The site's id, created when missing (call inside a write transaction). */
  async ensure(name: string): Promise<number> {
    const id = await this.c.sql.value<number>('SELECT id FROM sites WHERE name = ?', [name]);
    if (id !== undefined) return Number(id);
    return Number(
      await this.c.sql.value('INSERT INTO sites (name, created_at) VALUES (?, ?) RETURNING id', [
        name,
        this.c.now(),
      ]),
    );
  }

  /** The site a record belongs to; NotFoundError when there is no such record. */
  async siteOf(kind: SiteOwner, id: number): Promise<string> {
    const name = await this.c.sql.value<string>(SITE_OF[kind], [id]);
    if (name === undefined) throw new NotFoundError(kind, id);
    return name;
  }

  async selfReviewAllowedForVessel(vesselId: number): Promise<boolean> {
    const allowed = await this.c.sql.value(
      'SELECT s.self_review_allowed FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?',
      [vesselId],
    );
    return Number(allowed) === 1;
  }

  async setSelfReview(actor: Actor, name: string, allowed: boolean): Promise<Site> {
    return this.c.sql.tx(async () => {
      const before = await this.get(name);
      await this.c.sql.run('UPDATE sites SET self_review_allowed = ? WHERE id = ?', [
        allowed ? 1 : 0,
        before.id,
      ]);
      const after = await this.get(name);
      await this.c.audit.append(actor, this.c.now(), {
        action: 'site.settings',
        entityType: 'site',
        entityId: before.id,
        before,
        after,
      });
      return after;
    });
  }
}
