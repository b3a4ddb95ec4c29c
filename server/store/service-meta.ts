import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';

/** Facts about the database itself (migration 004): so far whether it holds the invented demo. */
export class ServiceMetaRepo {
  constructor(private readonly c: StoreContext) {}

  /** True when the demo scenario was loaded into this database (its records are invented). */
  async isDemo(): Promise<boolean> {
    return (
      (await this.c.sql.value('SELECT value FROM service_meta WHERE key = ?', ['purpose'])) ===
      'demo'
    );
  }

  /** Marks the database as the demo's, once, before anything invented is written into it. */
  async markDemo(actor: Actor): Promise<void> {
    await this.c.sql.tx(async () => {
      if (await this.isDemo()) return;
      const now = this.c.now();
      await this.c.sql.run('INSERT INTO service_meta (key, value, set_at) VALUES (?, ?, ?)', [
        'purpose',
        'demo',
        now,
      ]);
      await this.c.audit.append(actor, now, {
        action: 'service.mark-demo',
        entityType: 'service',
        entityId: null,
        after: { purpose: 'demo' },
      });
    });
  }
}
