import type { ApprovedFit, MaintenanceEvent as TrendEvent } from '../core/trend/types.js';
import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';

/**
 * What trending an outlet reads and keeps (migration 002): its approved fits as numbers, its
 * maintenance events, the cached status per outlet (marked stale by triggers), and the record of
 * status changes. The status itself is computed outside the store (server/jobs/trend.ts).
 */

/** An approved fit as the trend reads it, with the test it came from. */
export interface TrendFitRow extends ApprovedFit {
  testId: number;
  testedAt: string;
  approvedAt: string | null;
}

/** A fit that counts in an outlet's history but lacks a number the trend needs (an old or odd result). */
export interface SkippedFit {
  fitId: number;
  why: string;
}

export interface CachedStatus {
  outletId: number;
  outletKey: string;
  vesselId: number;
  vesselName: string;
  site: string;
  retired: boolean;
  computedAtMs: number;
  validUntilMs: number;
  /** The status object as computed (JSON). */
  body: Record<string, unknown>;
}

export interface StatusChange {
  id: number;
  outletId: number;
  fitId: number | null;
  fromStatus: string | null;
  toStatus: string;
  reason: string;
  daysToThreshold: number | null;
  at: string;
}

interface FitRow {
  id: number;
  test_id: number;
  tested_at: string | null;
  created_at: string;
  reviewed_at: string | null;
  cda_m2: number | null;
  cda_u: number | null;
  cd: number | null;
  cd_u: number | null;
}

interface StatusRow {
  outlet_id: number;
  key: string;
  vessel_id: number;
  vessel_name: string;
  site: string;
  retired_at: string | null;
  computed_at_ms: number;
  valid_until_ms: number;
  body: string;
}

interface ChangeRow {
  id: number;
  outlet_id: number;
  fit_id: number | null;
  from_status: string | null;
  to_status: string;
  reason: string;
  days_to_threshold: number | null;
  at: string;
}

const toChange = (r: ChangeRow): StatusChange => ({
  id: r.id,
  outletId: r.outlet_id,
  fitId: r.fit_id,
  fromStatus: r.from_status,
  toStatus: r.to_status,
  reason: r.reason,
  daysToThreshold: r.days_to_threshold,
  at: r.at,
});

/** The test's one date (migration 003); null for an old test no one could date (skipped, never placed at its upload time). */
function testedAtOf(r: FitRow): { iso: string; ms: number } | null {
  const ms = r.tested_at === null ? NaN : Date.parse(r.tested_at);
  return Number.isFinite(ms) ? { iso: r.tested_at!, ms } : null;
}

const STATUS_COLS = `s.outlet_id, o.key, o.vessel_id, v.name AS vessel_name, si.name AS site, o.retired_at,
  s.computed_at_ms, s.valid_until_ms, s.body
  FROM outlet_trend_status s JOIN outlets o ON o.id = s.outlet_id JOIN vessels v ON v.id = o.vessel_id
  JOIN sites si ON si.id = v.site_id`;

export class TrendRepo {
  constructor(private readonly c: StoreContext) {}

  /** The fits that count in an outlet's history: approved and not superseded, oldest test first. */
  async approvedFits(outletId: number): Promise<{ fits: TrendFitRow[]; skipped: SkippedFit[] }> {
    const fits: TrendFitRow[] = [];
    const skipped: SkippedFit[] = [];
    const rows = await this.c.sql.all<FitRow>(
      `SELECT f.id, f.test_id, t.tested_at, t.created_at, f.reviewed_at, f.cda_m2, f.cda_u, f.cd, f.cd_u
      FROM fits f JOIN drain_tests t ON t.id = f.test_id
      WHERE f.outlet_id = ? AND f.status = 'approved' AND f.superseded_by IS NULL ORDER BY f.id`,
      [outletId],
    );
    for (const r of rows) {
      if (r.cda_m2 === null || r.cda_u === null || r.cd === null || r.cd_u === null) {
        skipped.push({
          fitId: r.id,
          why: 'its result has no Cd·a or Cd with a standard uncertainty',
        });
        continue;
      }
      const t = testedAtOf(r);
      if (t === null) {
        skipped.push({
          fitId: r.id,
          why: `its test ${r.test_id} has no date (no date was stated and its log has only elapsed time)`,
        });
        continue;
      }
      fits.push({
        fitId: String(r.id),
        testId: r.test_id,
        testedAt: t.iso,
        testedAtMs: t.ms,
        approvedAt: r.reviewed_at,
        effectiveAreaM2: r.cda_m2,
        effectiveAreaU: r.cda_u,
        dischargeCoefficient: r.cd,
        dischargeCoefficientU: r.cd_u,
      });
    }
    // stable: equal times keep the order of approval
    fits.sort((a, b) => a.testedAtMs - b.testedAtMs);
    return { fits, skipped };
  }

  /** The outlet's maintenance events and its vessel's (an event with no outlet applies to all). */
  async events(outletId: number): Promise<TrendEvent[]> {
    const rows = await this.c.sql.all<{
      kind: TrendEvent['kind'];
      occurred_at: string;
      notes: string | null;
    }>(
      `SELECT e.kind, e.occurred_at, e.notes FROM maintenance_events e JOIN outlets o ON o.vessel_id = e.vessel_id
      WHERE o.id = ? AND (e.outlet_id IS NULL OR e.outlet_id = o.id) ORDER BY e.occurred_at, e.id`,
      [outletId],
    );
    return rows.map((e) => ({
      atMs: Date.parse(e.occurred_at),
      kind: e.kind,
      ...(e.notes ? { note: e.notes } : {}),
    }));
  }

  async outletIds(): Promise<number[]> {
    const rows = await this.c.sql.all<{ id: number }>('SELECT id FROM outlets ORDER BY id');
    return rows.map((r) => r.id);
  }

  async staleOutlets(): Promise<number[]> {
    const rows = await this.c.sql.all<{ outlet_id: number }>(
      'SELECT outlet_id FROM outlet_trend_stale ORDER BY outlet_id',
    );
    return rows.map((r) => r.outlet_id);
  }

  async isStale(outletId: number): Promise<boolean> {
    return (
      (await this.c.sql.value('SELECT 1 FROM outlet_trend_stale WHERE outlet_id = ?', [
        outletId,
      ])) !== undefined
    );
  }

  /** Stores an outlet's freshly computed status and clears its stale mark (call inside a transaction with the read). */
  async saveStatus(
    outletId: number,
    s: {
      status: string;
      daysToThreshold: number | null;
      computedAtMs: number;
      validUntilMs: number;
      body: unknown;
    },
  ): Promise<void> {
    await this.c.sql.run(
      `INSERT INTO outlet_trend_status (outlet_id, status, days_to_threshold, computed_at_ms, valid_until_ms, body)
      VALUES (@outletId, @status, @days, @computedAtMs, @validUntilMs, @body)
      ON CONFLICT (outlet_id) DO UPDATE SET status = excluded.status, days_to_threshold = excluded.days_to_threshold,
      computed_at_ms = excluded.computed_at_ms, valid_until_ms = excluded.valid_until_ms, body = excluded.body`,
      {
        outletId,
        status: s.status,
        days: s.daysToThreshold,
        computedAtMs: Math.round(s.computedAtMs),
        validUntilMs: Number.isFinite(s.validUntilMs) ? s.validUntilMs : 8.64e15,
        body: JSON.stringify(s.body),
      },
    );
    await this.c.sql.run('DELETE FROM outlet_trend_stale WHERE outlet_id = ?', [outletId]);
  }

  async cachedStatuses(): Promise<CachedStatus[]> {
    return (await this.c.sql.all<StatusRow>(`SELECT ${STATUS_COLS} ORDER BY s.outlet_id`)).map(
      toCached,
    );
  }

  async cachedStatus(outletId: number): Promise<CachedStatus | null> {
    const r = await this.c.sql.get<StatusRow>(`SELECT ${STATUS_COLS} WHERE s.outlet_id = ?`, [
      outletId,
    ]);
    return r ? toCached(r) : null;
  }

  /** Appends a status change with its audit entry (inside the caller's transaction, if any). */
  async recordStatusChange(
    actor: Actor,
    c: Omit<StatusChange, 'id' | 'at'>,
  ): Promise<StatusChange> {
    return this.c.sql.tx(async () => {
      const at = this.c.now();
      const id = await this.c.sql.value(
        `INSERT INTO outlet_status_changes (outlet_id, fit_id, from_status, to_status, reason, days_to_threshold, at)
        VALUES (@outletId, @fitId, @fromStatus, @toStatus, @reason, @daysToThreshold, @at) RETURNING id`,
        {
          outletId: c.outletId,
          fitId: c.fitId,
          fromStatus: c.fromStatus,
          toStatus: c.toStatus,
          reason: c.reason,
          daysToThreshold: c.daysToThreshold,
          at,
        },
      );
      const row = await this.c.sql.get<ChangeRow>(
        'SELECT * FROM outlet_status_changes WHERE id = ?',
        [Number(id)],
      );
      const change = toChange(row!);
      await this.c.audit.append(actor, at, {
        action: 'outlet.status-change',
        entityType: 'outlet',
        entityId: c.outletId,
        after: change,
      });
      return change;
    });
  }

  async statusChanges(outletId: number): Promise<StatusChange[]> {
    return (
      await this.c.sql.all<ChangeRow>(
        'SELECT * FROM outlet_status_changes WHERE outlet_id = ? ORDER BY id',
        [outletId],
      )
    ).map(toChange);
  }

  /** Runs fn in one write transaction (a transaction begun inside it joins it). */
  async write<T>(fn: () => Promise<T>): Promise<T> {
    return this.c.sql.tx(fn);
  }
}

function toCached(r: StatusRow): CachedStatus {
  return {
    outletId: r.outlet_id,
    outletKey: r.key,
    vesselId: r.vessel_id,
    vesselName: r.vessel_name,
    site: r.site,
    retired: r.retired_at !== null,
    computedAtMs: Number(r.computed_at_ms),
    validUntilMs: Number(r.valid_until_ms),
    body: JSON.parse(r.body),
  };
}
