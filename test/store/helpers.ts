import type Database from 'better-sqlite3';
import { openStore, SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { migrate } from '../../server/store/migrate.js';
import { SqliteSql } from '../../server/store/sqlite-sql.js';

/** migrate() on an SQLite connection, as openStore runs it (without the pre-migration copy). */
export function migrateSqlite(db: Database.Database, dir?: string): Promise<string[]> {
  const sql = new SqliteSql(db);
  return migrate(sql, dir, { exec: (s) => sql.exec(s) });
}

/** A store in memory with a clock that ticks one second per call (deterministic timestamps). */
export function memoryStore(): Promise<Store> {
  let t = Date.parse('2026-01-01T00:00:00Z');
  return openStore({ now: () => new Date((t += 1000)).toISOString() });
}

export const VESSEL = {
  name: 'T-1',
  shape: { kind: 'vertical-cylinder', diameterM: 3.0 },
  outlets: [
    {
      id: 'drain',
      boreM: 0.03,
      boreToleranceM: 0.0002,
      elevationM: 0,
      type: 'sharp-orifice',
      actionThreshold: 0.8,
    },
    { id: 'overflow', boreM: 0.05, elevationM: 2.5 },
  ],
  sensor: { zeroElevationM: 0 },
};

export const FIT_RESULT = {
  engineVersion: 'test-0',
  converged: true,
  dischargeCoefficient: { value: 0.61, standardUncertainty: 0.004, ci95: [0.602, 0.618] },
  effectiveAreaM2: { value: 4.3e-4, standardUncertainty: 3e-6, ci95: [4.24e-4, 4.36e-4] },
  window: { startS: 10, endS: 900, samples: 891 },
  warnings: [],
  timing: { parseMs: 1, fitMs: 2 },
};

export { SYSTEM_ACTOR };
