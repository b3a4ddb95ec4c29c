import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { NotFoundError } from './errors.js';

/**
 * Each site's clock and test interval, each outlet's own interval (migration 008), and what the
 * due list reads: every outlet with its latest test. Asynchronous on `c.sql` only.
 * Values are checked by the caller (server/core/trend/due.ts, server/core/ingest/zone.ts).
 */

export interface SiteClock {
  id: number;
  name: string;
  /** IANA zone a log's local times are read in when the uploader names none. */
  timeZone: string;
  testIntervalDays: number;
}

export interface OutletScheduleRow {
  outletId: number;
  outletKey: string;
  vesselId: number;
  vesselName: string;
  site: string;
  retired: boolean;
  siteIntervalDays: number;
  /** The outlet's own interval; null = the site's. */
  outletIntervalDays: number | null;
  /**
   * The latest drain test's date, ISO; null when none. A test counts once it is done (approved,
   * awaiting review, or not analysed yet); a test whose every fit was rejected does not.
   */
  latestTestAt: string | null;
}

interface SiteRow {
  id: number;
  name: string;
  time_zone: string;
  test_interval_days: number;
}
const toClock = (r: SiteRow): SiteClock => ({
  id: Number(r.id),
  name: r.name,
  timeZone: r.time_zone,
  testIntervalDays: Number(r.test_interval_days),
});

interface ScheduleRow {
  outlet_id: number;
  key: string;
  vessel_id: number;
  vessel_name: string;
  site: string;
  retired_at: string | null;
  site_interval: number;
  outlet_interval: number | null;
  latest: string | null;
}

const SCHEDULE_SQL = `SELECT o.id AS outlet_id, o.key, v.id AS vessel_id, v.name AS vessel_name, s.name AS site,
    o.retired_at, s.test_interval_days AS site_interval, o.test_interval_days AS outlet_interval,
    (SELECT MAX(t.tested_at) FROM drain_tests t WHERE t.outlet_id = o.id AND t.tested_at IS NOT NULL
      AND (NOT EXISTS (SELECT 1 FROM fits f WHERE f.test_id = t.id)
        OR EXISTS (SELECT 1 FROM fits f WHERE f.test_id = t.id AND f.status <> 'rejected'))) AS latest
  FROM outlets o JOIN vessels v ON v.id = o.vessel_id JOIN sites s ON s.id = v.site_id`;

export class ScheduleRepo {
  constructor(private readonly c: StoreContext) {}

  async sites(): Promise<SiteClock[]> {
    const rows = await this.c.sql.all<SiteRow>(
      'SELECT id, name, time_zone, test_interval_days FROM sites ORDER BY name',
    );
    return rows.map(toClock);
  }

  async site(name: string): Promise<SiteClock> {
    const r = await this.c.sql.get<SiteRow>(
      'SELECT id, name, time_zone, test_interval_days FROM sites WHERE name = ?',
      [name],
    );
    if (!r) throw new NotFoundError('site', name);
    return toClock(r);
  }

  /** The clock of the site a vessel belongs to. */
  async siteOfVessel(vesselId: number): Promise<SiteClock> {
    const r = await this.c.sql.get<SiteRow>(
      'SELECT s.id, s.name, s.time_zone, s.test_interval_days FROM vessels v JOIN sites s ON s.id = v.site_id WHERE v.id = ?',
      [vesselId],
    );
    if (!r) throw new NotFoundError('vessel', vesselId);
    return toClock(r);
  }

  /** Sets a site's zone and/or default interval (checked by the caller), audited as one change. */
  async setSite(
    actor: Actor,
    name: string,
    change: { timeZone?: string; testIntervalDays?: number },
  ): Promise<SiteClock> {
    return this.c.sql.tx(async () => {
      const before = await this.site(name);
      if (change.timeZone !== undefined)
        await this.c.sql.run('UPDATE sites SET time_zone = ? WHERE id = ?', [
          change.timeZone,
          before.id,
        ]);
      if (change.testIntervalDays !== undefined)
        await this.c.sql.run('UPDATE sites SET test_interval_days = ? WHERE id = ?', [
          change.testIntervalDays,
          before.id,
        ]);
      const after = await this.site(name);
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

  async outletInterval(outletId: number): Promise<{ outletIntervalDays: number | null }> {
    const r = await this.c.sql.get<{ d: number | null }>(
      'SELECT test_interval_days AS d FROM outlets WHERE id = ?',
      [outletId],
    );
    if (!r) throw new NotFoundError('outlet', outletId);
    return { outletIntervalDays: r.d === null ? null : Number(r.d) };
  }

  /** The outlet's own test interval in days, or null to follow its site's. */
  async setOutletInterval(actor: Actor, outletId: number, days: number | null): Promise<void> {
    await this.c.sql.tx(async () => {
      const before = await this.outletInterval(outletId);
      await this.c.sql.run('UPDATE outlets SET test_interval_days = ? WHERE id = ?', [
        days,
        outletId,
      ]);
      await this.c.audit.append(actor, this.c.now(), {
        action: 'outlet.interval',
        entityType: 'outlet',
        entityId: outletId,
        before,
        after: { outletIntervalDays: days },
      });
    });
  }

  /** Every outlet (or one) with its intervals and latest test (see latestTestAt). */
  async outlets(outletId?: number): Promise<OutletScheduleRow[]> {
    const rows =
      outletId === undefined
        ? await this.c.sql.all<ScheduleRow>(`${SCHEDULE_SQL} ORDER BY o.id`)
        : await this.c.sql.all<ScheduleRow>(`${SCHEDULE_SQL} WHERE o.id = ?`, [outletId]);
    return rows.map((r) => ({
      outletId: Number(r.outlet_id),
      outletKey: r.key,
      vesselId: Number(r.vessel_id),
      vesselName: r.vessel_name,
      site: r.site,
      retired: r.retired_at !== null,
      siteIntervalDays: Number(r.site_interval),
      outletIntervalDays: r.outlet_interval === null ? null : Number(r.outlet_interval),
      latestTestAt: r.latest,
    }));
  }
}
