import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Db } from './db.js';

/** migrations/ at the project root, found from this file (works from server/ and dist/server/). */
export function defaultMigrationsDir(): string {
  for (const up of ['../../migrations/', '../../../migrations/']) {
    const dir = fileURLToPath(new URL(up, import.meta.url));
    if (existsSync(`${dir}001_initial.sql`)) return dir;
  }
  throw new Error('migrations/ folder not found beside the program');
}

export interface MigrationFile {
  version: number;
  name: string;
  sql: string;
}

/** Files named NNN_words.sql, in numeric order; anything else in the folder is ignored. */
export function readMigrations(dir: string): MigrationFile[] {
  const out: MigrationFile[] = [];
  for (const name of readdirSync(dir)) {
    const m = /^(\d+)_[\w-]+\.sql$/.exec(name);
    if (!m) continue;
    out.push({ version: Number(m[1]), name, sql: readFileSync(`${dir}/${name}`, 'utf8') });
  }
  out.sort((a, b) => a.version - b.version);
  for (let i = 1; i < out.length; i++) {
    if (out[i].version === out[i - 1].version) {
      throw new Error(`two migrations share version ${out[i].version}: ${out[i - 1].name}, ${out[i].name}`);
    }
  }
  return out;
}

/**
 * Applies every migration newer than the database, each in its own transaction together with
 * its row in schema_migrations, so a failure leaves the database at the previous version.
 * Returns the names applied.
 */
export function migrate(db: Db, dir = defaultMigrationsDir()): string[] {
  db.exec(`CREATE TABLE IF NOT EXISTS schema_migrations (
    version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`);
  const done = new Set(
    (db.prepare('SELECT version FROM schema_migrations').all() as { version: number }[]).map((r) => r.version),
  );
  const record = db.prepare('INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)');
  const applied: string[] = [];
  for (const m of readMigrations(dir)) {
    if (done.has(m.version)) continue;
    db.transaction(() => {
      db.exec(m.sql);
      record.run(m.version, m.name, new Date().toISOString());
    }).immediate();
    applied.push(m.name);
  }
  return applied;
}
