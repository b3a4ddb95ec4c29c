import type { Outlet, Vessel } from '../core/stored-vessel.js';
import type { Actor } from './audit.js';
import { json, parse, type StoreContext } from './context.js';
import { ConflictError, NotFoundError } from './errors.js';

export type { Outlet, Vessel };

/** The columns this store reads out of a vessel file; the file itself is kept whole in `spec`. */
type OutletInput = Omit<Outlet, 'id' | 'retiredAt'>;

const DEFAULT_SITE = 'main';
/** Fixed SQL: a NULL @sites (JSON array text) switches the condition off. */
const IN_SITES = '(@sites IS NULL OR s.name IN (SELECT value FROM json_each(@sites)))';

function num(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}
function str(v: unknown): string | null {
  return typeof v === 'string' && v.length > 0 ? v : null;
}

/**
 * A vessel file names one `outlet` or (the service's extension) a list `outlets`; each may carry an
 * `id`, its key here. A single outlet without an id gets the key "main".
 */
export function outletsOf(spec: Record<string, unknown>): OutletInput[] {
  const list: unknown[] = Array.isArray(spec.outlets)
    ? spec.outlets
    : spec.outlet
      ? [spec.outlet]
      : [];
  return list.map((raw, i) => {
    const o = (raw ?? {}) as Record<string, unknown>;
    const key = str(o.id) ?? str(o.name) ?? (list.length === 1 ? 'main' : `outlet-${i + 1}`);
    return {
      key,
      type: str(o.type) ?? str(o.kind),
      boreM: num(o.boreM),
      boreToleranceM: num(o.boreToleranceM),
      elevationM: num(o.elevationM),
      actionThreshold: num(o.actionThreshold),
      spec: o,
    };
  });
}

interface VesselRow {
  id: number;
  site: string;
  name: string;
  revision: number;
  spec: string;
  created_at: string;
  updated_at: string;
}
interface OutletRow {
  id: number;
  vessel_id: number;
  key: string;
  type: string | null;
  bore_m: number | null;
  bore_tolerance_m: number | null;
  elevation_m: number | null;
  action_threshold: number | null;
  spec: string;
  retired_at: string | null;
}

function toOutlet(r: OutletRow): Outlet {
  return {
    id: r.id,
    key: r.key,
    type: r.type,
    boreM: r.bore_m,
    boreToleranceM: r.bore_tolerance_m,
    elevationM: r.elevation_m,
    actionThreshold: r.action_threshold,
    spec: JSON.parse(r.spec),
    retiredAt: r.retired_at,
  };
}

export class VesselRepo {
  private readonly q;

  constructor(private readonly c: StoreContext) {
    const db = c.db;
    this.q = {
      site: db.prepare('SELECT id FROM sites WHERE name = ?').pluck(),
      addSite: db.prepare('INSERT INTO sites (name, created_at) VALUES (?, ?)'),
      get: db.prepare(`SELECT v.id, s.name AS site, v.name, v.revision, v.spec, v.created_at, v.updated_at
        FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?`),
      byName: db
        .prepare(`SELECT v.id FROM vessels v JOIN sites s ON s.id = v.site_id
        WHERE s.name = ? AND v.name = ?`)
        .pluck(),
      list: db.prepare(`SELECT v.id, s.name AS site, v.name, v.revision, v.spec, v.created_at, v.updated_at
        FROM vessels v JOIN sites s ON s.id = v.site_id WHERE ${IN_SITES} ORDER BY v.id LIMIT @limit OFFSET @offset`),
      countIn: db
        .prepare(
          `SELECT count(*) FROM vessels v JOIN sites s ON s.id = v.site_id WHERE ${IN_SITES}`,
        )
        .pluck(),
      count: db.prepare('SELECT count(*) FROM vessels').pluck(),
      exists: db.prepare('SELECT 1 FROM vessels WHERE id = ?').pluck(),
      outlets: db.prepare('SELECT * FROM outlets WHERE vessel_id = ? ORDER BY id'),
      outlet: db.prepare('SELECT * FROM outlets WHERE id = ?'),
      insert:
        db.prepare(`INSERT INTO vessels (site_id, name, spec, shape, fluid, sensor, created_at, updated_at)
        VALUES (@siteId, @name, @spec, @shape, @fluid, @sensor, @now, @now)`),
      update:
        db.prepare(`UPDATE vessels SET site_id = @siteId, name = @name, spec = @spec, shape = @shape,
        fluid = @fluid, sensor = @sensor, revision = revision + 1, updated_at = @now WHERE id = @id`),
      insertOutlet:
        db.prepare(`INSERT INTO outlets (vessel_id, key, type, bore_m, bore_tolerance_m, elevation_m,
        action_threshold, spec) VALUES (@vesselId, @key, @type, @boreM, @boreToleranceM, @elevationM, @actionThreshold, @spec)`),
      updateOutlet:
        db.prepare(`UPDATE outlets SET type = @type, bore_m = @boreM, bore_tolerance_m = @boreToleranceM,
        elevation_m = @elevationM, action_threshold = @actionThreshold, spec = @spec, retired_at = NULL WHERE id = @id`),
      retireOutlet: db.prepare(
        'UPDATE outlets SET retired_at = ? WHERE id = ? AND retired_at IS NULL',
      ),
    };
  }

  get(id: number): Vessel {
    const row = this.q.get.get(id) as VesselRow | undefined;
    if (!row) throw new NotFoundError('vessel', id);
    return this.hydrate(row);
  }

  /** Throws NotFoundError as get(id) does, without reading the vessel file (hot read paths). */
  assertExists(id: number): void {
    if (this.q.exists.get(id) === undefined) throw new NotFoundError('vessel', id);
  }

  findId(site: string, name: string): number | null {
    return (this.q.byName.get(site, name) as number | undefined) ?? null;
  }

  /** A page of vessels, of the given sites only when `sites` is not null (a person limited to sites). */
  list(
    limit: number,
    offset: number,
    sites: readonly string[] | null = null,
  ): { items: Vessel[]; total: number } {
    const within = sites === null ? null : JSON.stringify(sites);
    const rows = this.q.list.all({ sites: within, limit, offset }) as VesselRow[];
    return {
      items: rows.map((r) => this.hydrate(r)),
      total: this.q.countIn.get({ sites: within }) as number,
    };
  }

  count(): number {
    return this.q.count.get() as number;
  }

  outlet(id: number): Outlet & { vesselId: number } {
    const row = this.q.outlet.get(id) as OutletRow | undefined;
    if (!row) throw new NotFoundError('outlet', id);
    return { ...toOutlet(row), vesselId: row.vessel_id };
  }

  /** Stores a vessel file (already validated) with its outlets; one transaction with the audit entry. */
  create(actor: Actor, spec: Record<string, unknown>): Vessel {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        const params = this.columns(spec, now);
        if (this.findId(params.site, params.name) !== null) {
          throw new ConflictError(
            `a vessel named "${params.name}" already exists at site "${params.site}"`,
          );
        }
        const id = Number(this.q.insert.run(params).lastInsertRowid);
        for (const o of outletsOf(spec))
          this.q.insertOutlet.run({ ...o, spec: JSON.stringify(o.spec), vesselId: id });
        const vessel = this.get(id);
        this.c.audit.append(actor, now, {
          action: 'vessel.create',
          entityType: 'vessel',
          entityId: id,
          after: vessel,
        });
        return vessel;
      })
      .immediate();
  }

  /**
   * Replaces the vessel file. Outlets are matched by key: changed ones updated, new ones added,
   * missing ones retired (never deleted: tests and fits refer to them).
   */
  update(actor: Actor, id: number, spec: Record<string, unknown>): Vessel {
    return this.c.db
      .transaction(() => {
        const before = this.get(id);
        const now = this.c.now();
        const params = this.columns(spec, now);
        const clash = this.findId(params.site, params.name);
        if (clash !== null && clash !== id) {
          throw new ConflictError(
            `a vessel named "${params.name}" already exists at site "${params.site}"`,
          );
        }
        this.q.update.run({ ...params, id });
        const existing = new Map(before.outlets.map((o) => [o.key, o]));
        const seen = new Set<string>();
        for (const o of outletsOf(spec)) {
          seen.add(o.key);
          const old = existing.get(o.key);
          const row = { ...o, spec: JSON.stringify(o.spec), vesselId: id };
          if (old) this.q.updateOutlet.run({ ...row, id: old.id });
          else this.q.insertOutlet.run(row);
        }
        for (const o of before.outlets) if (!seen.has(o.key)) this.q.retireOutlet.run(now, o.id);
        const after = this.get(id);
        this.c.audit.append(actor, now, {
          action: 'vessel.update',
          entityType: 'vessel',
          entityId: id,
          before,
          after,
        });
        return after;
      })
      .immediate();
  }

  private columns(spec: Record<string, unknown>, now: string) {
    const site = str(spec.site) ?? DEFAULT_SITE;
    let siteId = this.q.site.get(site) as number | undefined;
    if (siteId === undefined) siteId = Number(this.q.addSite.run(site, now).lastInsertRowid);
    return {
      site,
      siteId,
      name: str(spec.name) ?? 'unnamed',
      spec: JSON.stringify(spec),
      shape: json(spec.shape ?? {})!,
      fluid: json(spec.fluid),
      sensor: json(spec.sensor),
      now,
    };
  }

  private hydrate(row: VesselRow): Vessel {
    return {
      id: row.id,
      site: row.site,
      name: row.name,
      revision: row.revision,
      spec: parse<Record<string, unknown>>(row.spec)!,
      outlets: (this.q.outlets.all(row.id) as OutletRow[]).map(toOutlet),
      createdAt: row.created_at,
      updatedAt: row.updated_at,
    };
  }
}
