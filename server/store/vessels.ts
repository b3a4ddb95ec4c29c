import type { Outlet, Vessel } from '../core/stored-vessel.js';
import type { Actor } from './audit.js';
import { json, parse, type StoreContext } from './context.js';
import { ConflictError, NotFoundError } from './errors.js';

export type { Outlet, Vessel };

/** The columns this store reads out of a vessel file; the file itself is kept whole in `spec`. */
type OutletInput = Omit<Outlet, 'id' | 'retiredAt'>;

const DEFAULT_SITE = 'main';
/** Fixed SQL: a NULL @sites (JSON array text) switches the condition off; each dialect reads the array its way. */
const IN_SITES = {
  sqlite: '(@sites IS NULL OR s.name IN (SELECT value FROM json_each(@sites)))',
  postgres:
    '(CAST(@sites AS TEXT) IS NULL OR s.name IN (SELECT jsonb_array_elements_text(CAST(@sites AS jsonb))))',
};

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

const VESSEL_COLS = `SELECT v.id, s.name AS site, v.name, v.revision, v.spec, v.created_at, v.updated_at
  FROM vessels v JOIN sites s ON s.id = v.site_id`;
const INSERT_OUTLET = `INSERT INTO outlets (vessel_id, key, type, bore_m, bore_tolerance_m, elevation_m,
  action_threshold, spec) VALUES (@vesselId, @key, @type, @boreM, @boreToleranceM, @elevationM, @actionThreshold, @spec)`;

/** An outlet's columns as named parameters. */
function outletParams(o: OutletInput, vesselId: number) {
  return {
    vesselId,
    key: o.key,
    type: o.type,
    boreM: o.boreM,
    boreToleranceM: o.boreToleranceM,
    elevationM: o.elevationM,
    actionThreshold: o.actionThreshold,
    spec: JSON.stringify(o.spec),
  };
}

export class VesselRepo {
  constructor(private readonly c: StoreContext) {}

  async get(id: number): Promise<Vessel> {
    const row = await this.c.sql.get<VesselRow>(`${VESSEL_COLS} WHERE v.id = ?`, [id]);
    if (!row) throw new NotFoundError('vessel', id);
    return this.hydrate(row);
  }

  /** Throws NotFoundError as get(id) does, without reading the vessel file (hot read paths). */
  async assertExists(id: number): Promise<void> {
    if ((await this.c.sql.value('SELECT 1 FROM vessels WHERE id = ?', [id])) === undefined)
      throw new NotFoundError('vessel', id);
  }

  async findId(site: string, name: string): Promise<number | null> {
    const id = await this.c.sql.value(
      `SELECT v.id FROM vessels v JOIN sites s ON s.id = v.site_id WHERE s.name = ? AND v.name = ?`,
      [site, name],
    );
    return id === undefined ? null : Number(id);
  }

  /** A page of vessels, of the given sites only when `sites` is not null (a person limited to sites). */
  async list(
    limit: number,
    offset: number,
    sites: readonly string[] | null = null,
  ): Promise<{ items: Vessel[]; total: number }> {
    const within = sites === null ? null : JSON.stringify(sites);
    const inSites = IN_SITES[this.c.sql.dialect];
    const rows = await this.c.sql.all<VesselRow>(
      `${VESSEL_COLS} WHERE ${inSites} ORDER BY v.id LIMIT @limit OFFSET @offset`,
      { sites: within, limit, offset },
    );
    const items: Vessel[] = [];
    for (const r of rows) items.push(await this.hydrate(r));
    const total = await this.c.sql.value(
      `SELECT count(*) FROM vessels v JOIN sites s ON s.id = v.site_id WHERE ${inSites}`,
      { sites: within },
    );
    return { items, total: Number(total) };
  }

  async count(): Promise<number> {
    return Number(await this.c.sql.value('SELECT count(*) FROM vessels'));
  }

  async outlet(id: number): Promise<Outlet & { vesselId: number }> {
    const row = await this.c.sql.get<OutletRow>('SELECT * FROM outlets WHERE id = ?', [id]);
    if (!row) throw new NotFoundError('outlet', id);
    return { ...toOutlet(row), vesselId: row.vessel_id };
  }

  /** Stores a vessel file (already validated) with its outlets; one transaction with the audit entry. */
  async create(actor: Actor, spec: Record<string, unknown>): Promise<Vessel> {
    return this.c.sql.tx(async () => {
      const now = this.c.now();
      const params = await this.columns(spec, now);
      if ((await this.findId(params.site, params.name)) !== null) {
        throw new ConflictError(
          `a vessel named "${params.name}" already exists at site "${params.site}"`,
        );
      }
      const id = Number(
        await this.c.sql.value(
          `INSERT INTO vessels (site_id, name, spec, shape, fluid, sensor, created_at, updated_at)
          VALUES (@siteId, @name, @spec, @shape, @fluid, @sensor, @now, @now) RETURNING id`,
          {
            siteId: params.siteId,
            name: params.name,
            spec: params.spec,
            shape: params.shape,
            fluid: params.fluid,
            sensor: params.sensor,
            now,
          },
        ),
      );
      for (const o of outletsOf(spec)) await this.c.sql.run(INSERT_OUTLET, outletParams(o, id));
      const vessel = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: 'vessel.create',
        entityType: 'vessel',
        entityId: id,
        after: vessel,
      });
      return vessel;
    });
  }

  /**
   * Replaces the vessel file. Outlets are matched by key: changed ones updated, new ones added,
   * missing ones retired (never deleted: tests and fits refer to them).
   */
  async update(actor: Actor, id: number, spec: Record<string, unknown>): Promise<Vessel> {
    return this.c.sql.tx(async () => {
      const before = await this.get(id);
      const now = this.c.now();
      const params = await this.columns(spec, now);
      const clash = await this.findId(params.site, params.name);
      if (clash !== null && clash !== id) {
        throw new ConflictError(
          `a vessel named "${params.name}" already exists at site "${params.site}"`,
        );
      }
      await this.c.sql.run(
        `UPDATE vessels SET site_id = @siteId, name = @name, spec = @spec, shape = @shape,
        fluid = @fluid, sensor = @sensor, revision = revision + 1, updated_at = @now WHERE id = @id`,
        {
          siteId: params.siteId,
          name: params.name,
          spec: params.spec,
          shape: params.shape,
          fluid: params.fluid,
          sensor: params.sensor,
          now,
          id,
        },
      );
      const existing = new Map(before.outlets.map((o) => [o.key, o]));
      const seen = new Set<string>();
      for (const o of outletsOf(spec)) {
        seen.add(o.key);
        const old = existing.get(o.key);
        const row = outletParams(o, id);
        if (old)
          await this.c.sql.run(
            `UPDATE outlets SET type = @type, bore_m = @boreM, bore_tolerance_m = @boreToleranceM,
            elevation_m = @elevationM, action_threshold = @actionThreshold, spec = @spec, retired_at = NULL WHERE id = @id`,
            {
              type: row.type,
              boreM: row.boreM,
              boreToleranceM: row.boreToleranceM,
              elevationM: row.elevationM,
              actionThreshold: row.actionThreshold,
              spec: row.spec,
              id: old.id,
            },
          );
        else await this.c.sql.run(INSERT_OUTLET, row);
      }
      for (const o of before.outlets)
        if (!seen.has(o.key))
          await this.c.sql.run(
            'UPDATE outlets SET retired_at = ? WHERE id = ? AND retired_at IS NULL',
            [now, o.id],
          );
      const after = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: 'vessel.update',
        entityType: 'vessel',
        entityId: id,
        before,
        after,
      });
      return after;
    });
  }

  private async columns(spec: Record<string, unknown>, now: string) {
    const site = str(spec.site) ?? DEFAULT_SITE;
    let siteId = await this.c.sql.value('SELECT id FROM sites WHERE name = ?', [site]);
    if (siteId === undefined)
      siteId = await this.c.sql.value(
        'INSERT INTO sites (name, created_at) VALUES (?, ?) RETURNING id',
        [site, now],
      );
    return {
      site,
      siteId: Number(siteId),
      name: str(spec.name) ?? 'unnamed',
      spec: JSON.stringify(spec),
      shape: json(spec.shape ?? {})!,
      fluid: json(spec.fluid),
      sensor: json(spec.sensor),
    };
  }

  private async hydrate(row: VesselRow): Promise<Vessel> {
    const outlets = await this.c.sql.all<OutletRow>(
      'SELECT * FROM outlets WHERE vessel_id = ? ORDER BY id',
      [row.id],
    );
    return {
      id: row.id,
      site: row.site,
      name: row.name,
      revision: row.revision,
      spec: parse<Record<string, unknown>>(row.spec)!,
      outlets: outlets.map(toOutlet),
      createdAt: row.created_at,
      updatedAt: row.updated_at,
    };
  }
}
