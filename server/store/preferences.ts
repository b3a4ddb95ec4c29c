/**
 * A person's display preferences (migration 006): today the units they read results in. Written
 * async on `c.sql` only, for both engines. Not audited: a display choice changes no record.
 */
import { DEFAULT_UNIT_SYSTEM, isUnitSystem, type UnitSystem } from '../core/format/unit-system.js';
import type { StoreContext } from './context.js';

export interface Preferences {
  displayUnits: UnitSystem;
}

export class PreferenceRepo {
  constructor(private readonly c: StoreContext) {}

  /** The person's preferences, or the defaults when they have chosen nothing. */
  async get(userId: number): Promise<Preferences> {
    const units = await this.c.sql.value<string>(
      'SELECT display_units FROM user_preferences WHERE user_id = ?',
      [userId],
    );
    return { displayUnits: isUnitSystem(units) ? units : DEFAULT_UNIT_SYSTEM };
  }

  async setDisplayUnits(userId: number, units: UnitSystem): Promise<Preferences> {
    await this.c.sql.run(
      `INSERT INTO user_preferences (user_id, display_units, updated_at) VALUES (?, ?, ?)
       ON CONFLICT (user_id) DO UPDATE SET display_units = excluded.display_units, updated_at = excluded.updated_at`,
      [userId, units, this.c.now()],
    );
    return { displayUnits: units };
  }
}
