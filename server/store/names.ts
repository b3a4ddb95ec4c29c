import type { OutletName } from '../core/vessel/names.js';
import type { StoreContext } from './context.js';

/** What the CLI resolves names against: every outlet with its vessel and site, every site name. */
export class NameRepo {
  constructor(private readonly c: StoreContext) {}

  async outlets(): Promise<OutletName[]> {
    const rows = await this.c.sql.all<{
      outlet_id: number;
      key: string;
      vessel_id: number;
      vessel_name: string;
      spec: string;
      site: string;
      retired_at: string | null;
    }>(
      `SELECT o.id AS outlet_id, o.key, v.id AS vessel_id, v.name AS vessel_name, v.spec, s.name AS site,
       o.retired_at FROM outlets o JOIN vessels v ON v.id = o.vessel_id JOIN sites s ON s.id = v.site_id
       ORDER BY o.id`,
    );
    return rows.map((r) => {
      const tag = (JSON.parse(r.spec) as { tag?: unknown }).tag;
      return {
        outletId: Number(r.outlet_id),
        key: r.key,
        vesselId: Number(r.vessel_id),
        vesselName: r.vessel_name,
        vesselTag: typeof tag === 'string' && tag.length > 0 ? tag : null,
        site: r.site,
        retired: r.retired_at !== null,
      };
    });
  }

  async sites(): Promise<string[]> {
    const rows = await this.c.sql.all<{ name: string }>('SELECT name FROM sites ORDER BY name');
    return rows.map((r) => r.name);
  }
}
