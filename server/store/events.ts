import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { NotFoundError } from './errors.js';

export type MaintenanceKind = 'cleaned' | 'replaced' | 'modified';

export interface MaintenanceEvent {
  id: number;
  vesselId: number;
  outletId: number | null;
  kind: MaintenanceKind;
  occurredAt: string;
  notes: string | null;
  createdBy: number | null;
  createdAt: string;
}

interface EventRow {
  id: number;
  vessel_id: number;
  outlet_id: number | null;
  kind: MaintenanceKind;
  occurred_at: string;
  notes: string | null;
  created_by: number | null;
  created_at: string;
}

const toEvent = (r: EventRow): MaintenanceEvent => ({
  id: r.id,
  vesselId: r.vessel_id,
  outletId: r.outlet_id,
  kind: r.kind,
  occurredAt: r.occurred_at,
  notes: r.notes,
  createdBy: r.created_by,
  createdAt: r.created_at,
});

/** Maintenance events per outlet (cleaned, replaced, modified): a new baseline for the trend. */
export class EventRepo {
  constructor(private readonly c: StoreContext) {}

  async get(id: number): Promise<MaintenanceEvent> {
    const row = await this.c.sql.get<EventRow>('SELECT * FROM maintenance_events WHERE id = ?', [
      id,
    ]);
    if (!row) throw new NotFoundError('maintenance event', id);
    return toEvent(row);
  }

  async create(
    actor: Actor,
    e: {
      vesselId: number;
      outletId: number | null;
      kind: MaintenanceKind;
      occurredAt: string;
      notes?: string | null;
    },
  ): Promise<MaintenanceEvent> {
    return this.c.sql.tx(async () => {
      const now = this.c.now();
      const id = Number(
        await this.c.sql.value(
          `INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, notes, created_by, created_at)
          VALUES (@vesselId, @outletId, @kind, @occurredAt, @notes, @createdBy, @now) RETURNING id`,
          {
            vesselId: e.vesselId,
            outletId: e.outletId,
            kind: e.kind,
            occurredAt: e.occurredAt,
            notes: e.notes ?? null,
            createdBy: actor.id,
            now,
          },
        ),
      );
      const event = await this.get(id);
      await this.c.audit.append(actor, now, {
        action: 'event.create',
        entityType: 'maintenance-event',
        entityId: id,
        after: event,
      });
      return event;
    });
  }

  async listByVessel(
    vesselId: number,
    limit: number,
    offset: number,
  ): Promise<{ items: MaintenanceEvent[]; total: number }> {
    const rows = await this.c.sql.all<EventRow>(
      'SELECT * FROM maintenance_events WHERE vessel_id = ? ORDER BY occurred_at, id LIMIT ? OFFSET ?',
      [vesselId, limit, offset],
    );
    return {
      items: rows.map(toEvent),
      total: Number(
        await this.c.sql.value('SELECT count(*) FROM maintenance_events WHERE vessel_id = ?', [
          vesselId,
        ]),
      ),
    };
  }
}
