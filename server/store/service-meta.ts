import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';

/** Facts about the database itself (migration 004): so far whether it holds the invented demo. */
export class ServiceMetaRepo {
  private readonly q;
  constructor(private readonly c: StoreContext) {
    this.q = {
      get: c.db.prepare('SELECT value FROM service_meta WHERE key = ?').pluck(),
      put: c.db.prepare('INSERT INTO service_meta (key, value, set_at) VALUES (?, ?, ?)'),
    };
  }

  /** True when the demo scenario was loaded into this database (its records are invented). */
  isDemo(): boolean {
    return this.q.get.get('purpose') === 'demo';
  }

  /** Marks the database as the demo's, once, before anything invented is written into it. */
  markDemo(actor: Actor): void {
    this.c.db
      .transaction(() => {
        if (this.isDemo()) return;
        const now = this.c.now();
        this.q.put.run('purpose', 'demo', now);
        this.c.audit.append(actor, now, {
          action: 'service.mark-demo',
          entityType: 'service',
          entityId: null,
          after: { purpose: 'demo' },
        });
      })
      .immediate();
  }
}
