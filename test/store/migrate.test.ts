import Database from 'better-sqlite3';
import { mkdtempSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/store/db.js';
import { defaultMigrationsDir, readMigrations } from '../../server/store/migrate.js';
import { migrateSqlite } from './helpers.js';

describe('migrations', () => {
  it('applies every file to an empty database, in order, and records each', async () => {
    const db = new Database(':memory:');
    const files = readMigrations(defaultMigrationsDir());
    expect(files.length).toBeGreaterThan(0);
    const applied = await migrateSqlite(db);
    expect(applied).toEqual(files.map((f) => f.name));
    const recorded = db
      .prepare('SELECT version, name FROM schema_migrations ORDER BY version')
      .all();
    expect(recorded).toEqual(files.map((f) => ({ version: f.version, name: f.name })));
    const tables = db
      .prepare(`SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name`)
      .pluck()
      .all();
    for (const t of [
      'sites',
      'vessels',
      'outlets',
      'raw_files',
      'drain_tests',
      'fits',
      'maintenance_events',
      'users',
      'api_tokens',
      'sessions',
      'audit_log',
      'schema_migrations',
    ]) {
      expect(tables).toContain(t);
    }
    const triggers = db
      .prepare(`SELECT name FROM sqlite_master WHERE type = 'trigger'`)
      .pluck()
      .all();
    expect(triggers).toEqual(
      expect.arrayContaining([
        'fits_no_delete',
        'fits_immutable',
        'audit_log_no_update',
        'audit_log_no_delete',
      ]),
    );
    const fitCols = db
      .prepare('PRAGMA table_info(fits)')
      .all()
      .map((c: any) => c.name);
    expect(fitCols).toEqual(
      expect.arrayContaining(['settings', 'result', 'engine_version', 'status', 'superseded_by']),
    );
    // a second run applies nothing
    expect(await migrateSqlite(db)).toEqual([]);
  });

  it('opens files in WAL with foreign keys on and synchronous FULL', () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-db-'));
    const db = openDatabase(dir);
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(db.pragma('synchronous', { simple: true })).toBe(2); // 2 = FULL (SQLite docs, PRAGMA synchronous)
    db.close();
  });

  it('rolls back a failing migration whole and leaves it unrecorded', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-mig-'));
    copyFileSync(join(defaultMigrationsDir(), '001_initial.sql'), join(dir, '001_initial.sql'));
    writeFileSync(
      join(dir, '002_broken.sql'),
      'CREATE TABLE half_done (x INTEGER);\nTHIS IS NOT SQL;',
    );
    const db = new Database(':memory:');
    await expect(migrateSqlite(db, dir)).rejects.toThrow(/002_broken.sql failed at statement 2/);
    expect(db.prepare('SELECT max(version) FROM schema_migrations').pluck().get()).toBe(1);
    expect(
      db.prepare(`SELECT count(*) FROM sqlite_master WHERE name = 'half_done'`).pluck().get(),
    ).toBe(0);
  });
});
