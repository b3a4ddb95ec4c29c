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
  private readonly q;

  constructor(private readonly c: StoreContext) {
    this.q = {
      insert:
        c.db.prepare(`INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, notes, created_by, created_at)
        VALUES (@vesselId, @outletId, @kind, @occurredAt, @notes, @createdBy, @now)`),
      get: c.db.prepare('SELECT * FROM maintenance_events WHERE id = ?'),
      list: c.db.prepare(
        'SELECT * FROM maintenance_events WHERE vessel_id = ? ORDER BY occurred_at, id LIMIT ? OFFSET ?',
      ),
      count: c.db.prepare('SELECT count(*) FROM maintenance_events WHERE vessel_id = ?').pluck(),
    };
  }

  get(id: number): MaintenanceEvent {
    const row = this.q.get.get(id) as EventRow | undefined;
    if (!row) throw new NotFoundError('maintenance event', id);
    return toEvent(row);
  }

  create(
    actor: Actor,
    e: {
      vesselId: number;
      outletId: number | null;
      kind: MaintenanceKind;
      occurredAt: string;
      notes?: string | null;
    },
  ): MaintenanceEvent {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        const id = Number(
          this.q.insert.run({ ...e, notes: e.notes ?? null, createdBy: actor.id, now })
            .lastInsertRowid,
        );
        const event = this.get(id);
        this.c.audit.append(actor, now, {
          action: 'event.create',
          entityType: 'maintenance-event',
          entityId: id,
          after: event,
        });
        return event;
      })
      .immediate();
  }

  listByVessel(
    vesselId: number,
    limit: number,
    offset: number,
  ): { items: MaintenanceEvent[]; total: number } {
    return {
      items: (this.q.list.all(vesselId, limit, offset) as EventRow[]).map(toEvent),
      total: this.q.count.get(vesselId) as number,
    };
  }
}
