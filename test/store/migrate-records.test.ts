/**
 * Migration 003 on an existing database: tests stored without a date get it from their stored log
 * (the first fit's window start) where it has one; stated dates SQLite can read stay verbatim (so
 * reports already issued still verify); the rest are listed in undated_tests with the reason.
 */
import Database from 'better-sqlite3';
import { copyFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultMigrationsDir } from '../../server/store/migrate.js';
import { migrateSqlite } from './helpers.js';

async function databaseAt002(): Promise<Database.Database> {
  const dir = mkdtempSync(join(tmpdir(), 'efflux-mig002-'));
  for (const f of ['001_initial.sql', '002_trend.sql'])
    copyFileSync(join(defaultMigrationsDir(), f), join(dir, f));
  const db = new Database(':memory:');
  db.pragma('foreign_keys = ON');
  await migrateSqlite(db, dir);
  return db;
}

describe('migration 003 on an existing database', () => {
  it('dates old tests from their stored logs and reports the ones it could not date', async () => {
    const db = await databaseAt002();
    const at = '2026-01-05T10:00:00.000Z';
    db.prepare(`INSERT INTO sites (id, name, created_at) VALUES (1, 'main', ?)`).run(at);
    db.prepare(
      `INSERT INTO vessels (id, site_id, name, spec, shape, created_at, updated_at) VALUES (1, 1, 'T-1', '{}', '{}', ?, ?)`,
    ).run(at, at);
    const raw = db.prepare(
      `INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES (?, 1, x'00', ?)`,
    );
    const test =
      db.prepare(`INSERT INTO drain_tests (id, vessel_id, log_sha256, log_name, settings, status, tested_at, created_at, detected)
      VALUES (?, 1, ?, 'log.csv', '{}', ?, ?, ?, ?)`);
    const fit =
      db.prepare(`INSERT INTO fits (test_id, vessel_id, settings, vessel_spec, result, engine_version, created_at)
      VALUES (?, 1, '{}', '{}', ?, 'old', ?)`);
    const cases: [
      id: number,
      status: string,
      testedAt: string | null,
      windowStart: string | null | undefined,
    ][] = [
      [1, 'analysed', '2025-01-14T09:00:00Z', '2025-01-14T09:02:00.000Z'], // stated, readable: kept verbatim
      [2, 'analysed', null, '2024-10-07T06:31:10.000Z'], // no date: from its log
      [3, 'analysed', null, null], // elapsed-time log, no date: undated
      [4, 'analysed', 'next tuesday', '2024-11-02T12:00:00.000Z'], // unreadable stated text: from its log
      [5, 'analysed', 'next tuesday', null], // unreadable and no clock: undated
      [6, 'pending', null, undefined], // not analysed yet: dated when it is
      [7, 'analysed', null, null], // elapsed time, but the preamble says when logging started (window at 70 s)
    ];
    const started = JSON.stringify({
      metadata: [
        {
          line: 2,
          text: 'Started: 2024-10-07T08:00:00Z',
          key: 'Started',
          value: '2024-10-07T08:00:00Z',
        },
      ],
    });
    for (const [id, status, testedAt, start] of cases) {
      const sha = String(id).padStart(64, '0');
      raw.run(sha, at);
      test.run(id, sha, status, testedAt, at, id === 7 ? started : null);
      if (start !== undefined)
        fit.run(
          id,
          JSON.stringify({
            window: { startS: id === 7 ? 70 : 0, endS: 900, samples: 10, startTime: start },
          }),
          at,
        );
    }
    const applied = await migrateSqlite(db);
    expect(applied).toContain('003_records.sql');
    const rows = db
      .prepare('SELECT id, tested_at, tested_at_source FROM drain_tests ORDER BY id')
      .all();
    expect(rows).toEqual([
      { id: 1, tested_at: '2025-01-14T09:00:00Z', tested_at_source: 'stated' },
      { id: 2, tested_at: '2024-10-07T06:31:10.000Z', tested_at_source: 'log' },
      { id: 3, tested_at: null, tested_at_source: null },
      { id: 4, tested_at: '2024-11-02T12:00:00.000Z', tested_at_source: 'log' },
      { id: 5, tested_at: null, tested_at_source: null },
      { id: 6, tested_at: null, tested_at_source: null },
      { id: 7, tested_at: '2024-10-07T08:01:10.000Z', tested_at_source: 'log' }, // as logTestDate computes it
    ]);
    const undated = db
      .prepare('SELECT test_id, reason FROM undated_tests ORDER BY test_id')
      .all() as { test_id: number; reason: string }[];
    expect(undated.map((u) => u.test_id)).toEqual([3, 5]);
    expect(undated[1].reason).toContain('"next tuesday"');
    // a date, once there, never changes; a pending test takes one once, at its analysis
    expect(() =>
      db.prepare(`UPDATE drain_tests SET tested_at = '2020-01-01T00:00:00Z' WHERE id = 2`).run(),
    ).toThrow(/immutable/);
    db.prepare(
      `UPDATE drain_tests SET status = 'analysed', tested_at = '2026-01-01T00:00:00.000Z', tested_at_source = 'log' WHERE id = 6`,
    ).run();
    expect(() => db.prepare(`UPDATE drain_tests SET tested_at = NULL WHERE id = 6`).run()).toThrow(
      /immutable/,
    );
  });
});
