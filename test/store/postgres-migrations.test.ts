// migrations/postgres against a real server (vitest project `postgres`): every file applies to an
// empty database, the append-only rules refuse with SQLite's words, two runners apply each once.
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openMemoryDatabase } from '../../server/store/db.js';
import { isRuleRefusal } from '../../server/store/errors.js';
import {
  defaultMigrationsDir,
  MigrationError,
  NewerSchemaError,
  readMigrations,
  schemaVersion,
} from '../../server/store/migrate.js';
import {
  defaultPostgresMigrationsDir,
  migratePostgres,
} from '../../server/store/postgres-migrate.js';
import { PostgresSql } from '../../server/store/postgres-sql.js';
import { createTestDatabase, type TestDatabase } from '../support/postgres.js';
import { migrateSqlite } from './helpers.js';

const dropped: TestDatabase[] = [];
const pools: PostgresSql[] = [];
afterAll(async () => {
  for (const s of pools) await s.close();
  for (const d of dropped) await d.drop();
});
async function emptyDatabase(): Promise<{ db: TestDatabase; sql: PostgresSql }> {
  const db = await createTestDatabase();
  dropped.push(db);
  const sql = new PostgresSql({ connectionString: db.url, max: 4 });
  pools.push(sql);
  return { db, sql };
}

const SQLITE_FILES = readMigrations(defaultMigrationsDir()).map((m) => m.name);

/** A row in each append-only table, through plain SQL (the repositories are not needed here). */
async function seed(sql: PostgresSql) {
  const at = '2026-01-01T00:00:00.000Z';
  const site = await sql.value<number>(
    'INSERT INTO sites (name, created_at) VALUES (?, ?) RETURNING id',
    ['main', at],
  );
  const vessel = await sql.value<number>(
    `INSERT INTO vessels (site_id, name, spec, shape, created_at, updated_at) VALUES (?, 'T-1', '{}', '{"kind":"box"}', ?, ?) RETURNING id`,
    [site!, at, at],
  );
  const outlet = await sql.value<number>(
    `INSERT INTO outlets (vessel_id, key, action_threshold, spec) VALUES (?, 'drain', 0.8, '{}') RETURNING id`,
    [vessel!],
  );
  await sql.run(`INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES (?, 3, ?, ?)`, [
    'a'.repeat(64),
    Buffer.from('abc'),
    at,
  ]);
  const test = await sql.value<number>(
    `INSERT INTO drain_tests (vessel_id, outlet_id, log_sha256, log_name, settings, status, tested_at, tested_at_source, created_at)
     VALUES (?, ?, ?, 'log.csv', '{}', 'pending', ?, 'stated', ?) RETURNING id`,
    [vessel!, outlet!, 'a'.repeat(64), at, at],
  );
  await sql.run(`UPDATE drain_tests SET status = 'analysed', detected = '{}' WHERE id = ?`, [
    test!,
  ]);
  const fit = await sql.value<number>(
    `INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd, status, created_at)
     VALUES (?, ?, ?, '{}', '{}', '{}', 'test-0', 0.0004, 0.61, 'approved', ?) RETURNING id`,
    [test!, vessel!, outlet!, at],
  );
  await sql.run(
    `INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, created_at) VALUES (?, NULL, 'cleaned', ?, ?)`,
    [vessel!, at, at],
  );
  await sql.run(
    `INSERT INTO audit_log (seq, at, actor_name, action, entity_type, entity_id, prev_hash, hash)
     VALUES (1, ?, 'system', 'vessel.create', 'vessel', '1', ?, ?)`,
    [at, '0'.repeat(64), 'b'.repeat(64)],
  );
  await sql.run(
    `INSERT INTO outlet_status_changes (outlet_id, fit_id, to_status, reason, at) VALUES (?, ?, 'ok', 'r', ?)`,
    [outlet!, fit!, at],
  );
  await sql.run(`INSERT INTO service_meta (key, value, set_at) VALUES ('purpose', 'demo', ?)`, [
    at,
  ]);
  await sql.run(
    `INSERT INTO analysis_failures (test_id, failed_at, reason) VALUES (?, ?, 'timeout')`,
    [test!, at],
  );
  return { vessel: vessel!, outlet: outlet!, test: test!, fit: fit! };
}

/** The same forbidden statements, on SQLite (migrated in memory), for the expected message text. */
async function sqliteRefusal(
  statement: string,
  setup: (db: ReturnType<typeof openMemoryDatabase>) => void,
): Promise<string> {
  const db = openMemoryDatabase();
  await migrateSqlite(db);
  try {
    setup(db);
    db.exec(statement);
  } catch (e) {
    return (e as Error).message;
  } finally {
    db.close();
  }
  throw new Error(`SQLite accepted: ${statement}`);
}

describe('migrations/postgres', () => {
  it('carries the same numbers and names as the SQLite migrations', () => {
    expect(readMigrations(defaultPostgresMigrationsDir()).map((m) => m.name)).toEqual(SQLITE_FILES);
  });

  it('applies every file to an empty database, each recorded once, and then nothing more', async () => {
    const { sql } = await emptyDatabase();
    expect(await schemaVersion(sql)).toBe(0);
    expect(await migratePostgres(sql)).toEqual(SQLITE_FILES);
    expect(await sql.all('SELECT version, name FROM schema_migrations ORDER BY version')).toEqual(
      SQLITE_FILES.map((name) => ({ version: Number(name.slice(0, 3)), name })),
    );
    expect(await migratePostgres(sql)).toEqual([]);
    const tables = await sql.all<{ t: string }>(
      "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = 'public' ORDER BY 1",
    );
    // the same tables as SQLite's schema
    const lite = openMemoryDatabase();
    await migrateSqlite(lite);
    const liteTables = (
      lite
        .prepare(
          "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
        )
        .all() as { name: string }[]
    ).map((r) => r.name);
    lite.close();
    // the same tables as SQLite's schema, and write_counter (PostgreSQL's stand-in for PRAGMA data_version)
    expect(tables.map((r) => r.t).sort()).toEqual([...liteTables, 'write_counter'].sort());
  });

  it('refuses what SQLite refuses, with the same words', async () => {
    const { sql } = await emptyDatabase();
    await migratePostgres(sql);
    const ids = await seed(sql);
    // [statement on PostgreSQL, the same on SQLite after the same seed]
    const cases: [string, string][] = [
      ["UPDATE audit_log SET actor_name = 'x'", "UPDATE audit_log SET actor_name = 'x'"],
      ['DELETE FROM audit_log', 'DELETE FROM audit_log'],
      [`UPDATE raw_files SET size = 4`, 'UPDATE raw_files SET size = 4'],
      ['DELETE FROM fits', 'DELETE FROM fits'],
      [`UPDATE fits SET cd = 0.7`, 'UPDATE fits SET cd = 0.7'],
      [`UPDATE fits SET status = 'rejected'`, "UPDATE fits SET status = 'rejected'"],
      [
        "UPDATE drain_tests SET log_name = 'other.csv'",
        "UPDATE drain_tests SET log_name = 'other.csv'",
      ],
      ['DELETE FROM drain_tests', 'DELETE FROM drain_tests'],
      ["UPDATE maintenance_events SET notes = 'x'", "UPDATE maintenance_events SET notes = 'x'"],
      [
        "UPDATE outlet_status_changes SET reason = 'x'",
        "UPDATE outlet_status_changes SET reason = 'x'",
      ],
      ["UPDATE service_meta SET value = 'real'", "UPDATE service_meta SET value = 'real'"],
      ["UPDATE analysis_failures SET reason = 'x'", "UPDATE analysis_failures SET reason = 'x'"],
    ];
    const liteSeed = (db: ReturnType<typeof openMemoryDatabase>) => {
      const at = '2026-01-01T00:00:00.000Z';
      db.exec(`INSERT INTO sites (id, name, created_at) VALUES (1, 'main', '${at}');
        INSERT INTO vessels (id, site_id, name, spec, shape, created_at, updated_at) VALUES (1, 1, 'T-1', '{}', '{"kind":"box"}', '${at}', '${at}');
        INSERT INTO outlets (id, vessel_id, key, action_threshold, spec) VALUES (1, 1, 'drain', 0.8, '{}');
        INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES ('${'a'.repeat(64)}', 3, x'616263', '${at}');
        INSERT INTO drain_tests (id, vessel_id, outlet_id, log_sha256, log_name, settings, status, tested_at, tested_at_source, created_at)
          VALUES (1, 1, 1, '${'a'.repeat(64)}', 'log.csv', '{}', 'pending', '${at}', 'stated', '${at}');
        UPDATE drain_tests SET status = 'analysed', detected = '{}' WHERE id = 1;
        INSERT INTO fits (id, test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd, status, created_at)
          VALUES (1, 1, 1, 1, '{}', '{}', '{}', 'test-0', 0.0004, 0.61, 'approved', '${at}');
        INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, created_at) VALUES (1, NULL, 'cleaned', '${at}', '${at}');
        INSERT INTO audit_log (seq, at, actor_name, action, entity_type, entity_id, prev_hash, hash)
          VALUES (1, '${at}', 'system', 'vessel.create', 'vessel', '1', '${'0'.repeat(64)}', '${'b'.repeat(64)}');
        INSERT INTO outlet_status_changes (outlet_id, fit_id, to_status, reason, at) VALUES (1, 1, 'ok', 'r', '${at}');
        INSERT INTO service_meta (key, value, set_at) VALUES ('purpose', 'demo', '${at}');
        INSERT INTO analysis_failures (test_id, failed_at, reason) VALUES (1, '${at}', 'timeout');`);
    };
    for (const [pgStatement, liteStatement] of cases) {
      const expected = await sqliteRefusal(liteStatement, liteSeed);
      const e = await sql.run(pgStatement).catch((x: unknown) => x);
      expect(e, pgStatement).toBeInstanceOf(Error);
      expect((e as Error).message, pgStatement).toBe(expected);
      expect(isRuleRefusal(e), pgStatement).toBe(true);
    }
    // and TRUNCATE, which SQLite does not have, does not get round them
    await expect(sql.run('TRUNCATE audit_log')).rejects.toThrow('the audit log is append-only');
    // what is allowed still is: a draft reviewed once, a pending test withdrawn
    const draft = await sql.value<number>(
      `INSERT INTO fits (test_id, vessel_id, settings, vessel_spec, result, engine_version, created_at)
       VALUES (?, ?, '{}', '{}', '{}', 'test-0', '2026-01-02T00:00:00.000Z') RETURNING id`,
      [ids.test, ids.vessel],
    );
    expect(
      (
        await sql.run(`UPDATE fits SET status = 'approved', reviewed_at = 'now' WHERE id = ?`, [
          draft!,
        ])
      ).changes,
    ).toBe(1);
  });

  it('marks outlets stale as the SQLite triggers do (an event without an outlet: every outlet of the vessel)', async () => {
    const { sql } = await emptyDatabase();
    await migratePostgres(sql);
    const ids = await seed(sql);
    const second = await sql.value<number>(
      `INSERT INTO outlets (vessel_id, key, spec) VALUES (?, 'overflow', '{}') RETURNING id`,
      [ids.vessel],
    );
    await sql.run('DELETE FROM outlet_trend_stale');
    await sql.run(
      `INSERT INTO maintenance_events (vessel_id, kind, occurred_at, created_at) VALUES (?, 'cleaned', 'x', 'x')`,
      [ids.vessel],
    );
    expect(await sql.all('SELECT outlet_id FROM outlet_trend_stale ORDER BY outlet_id')).toEqual([
      { outlet_id: ids.outlet },
      { outlet_id: second },
    ]);
    await sql.run('DELETE FROM outlet_trend_stale');
    await sql.run('UPDATE outlets SET action_threshold = 0.7 WHERE id = ?', [second!]);
    await sql.run(`UPDATE outlets SET type = 'nozzle' WHERE id = ?`, [ids.outlet]); // not an input of the status
    expect(await sql.all('SELECT outlet_id FROM outlet_trend_stale')).toEqual([
      { outlet_id: second },
    ]);
  });

  it('reads dates as SQLite does in the backfills of 003 (SQLite itself is the reference)', async () => {
    const { sql } = await emptyDatabase();
    await migratePostgres(sql);
    const lite = openMemoryDatabase();
    const texts = [
      '2024-10-07T08:00:00Z',
      '2024-10-07 08:00:00.25+02:00',
      '2024-10-07T08:00-05:30',
      '  2024-10-07 08:00:00Z',
      '2024-10-07 T 08:00:00 Z  ',
      '2024-10-0708:00',
      '2024-10-07T',
      '2024-10-07Z',
      '2024-10-07T08:00:00.',
      '2024-10-07T08:00:00.123456789Z',
      '2024-10-07T08:00:00+14:59',
      '0000-01-01',
      ' 2460000.5 ',
      '1e3',
      '-5',
      'NOW',
      ' now',
      '2024-02-30T10:00:00Z', // SQLite rolls past the month's end
      '2024-10-07T24:00:00Z',
      '2024-10-07',
      '08:30',
      '2024-13-01',
      '2024-10-32',
      '2024-10-07T08:60:00Z',
      '2024-10-07T08:00:00+15:00',
      '7 Oct 2024',
      '2460000.5',
      'now',
      'yesterday',
      '',
    ];
    for (const t of texts) {
      const liteValid = lite.prepare("SELECT strftime('%s', ?) IS NOT NULL").pluck().get(t) === 1;
      expect(await sql.value('SELECT efflux_sqlite_time_valid(?)', [t]), t).toBe(liteValid);
      if (!/^[1-9]\d{3}-\d{2}-\d{2}[T ]/.test(t) || !liteValid) continue;
      // the preamble backfill: strftime('%Y-%m-%dT%H:%M:%fZ', start, '+12.345 seconds')
      const liteStart = lite
        .prepare("SELECT strftime('%Y-%m-%dT%H:%M:%fZ', ?, printf('%+.3f seconds', 12.3454))")
        .pluck()
        .get(t);
      const pgStart = await sql.value(
        `SELECT to_char(efflux_sqlite_time(?) + make_interval(secs => round(12.3454::numeric, 3)::double precision),
           'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`,
        [t],
      );
      expect(pgStart, t).toBe(liteStart);
    }
    lite.close();
  });

  it('two runners starting together apply each migration once', async () => {
    const { db, sql } = await emptyDatabase();
    const other = new PostgresSql({ connectionString: db.url, max: 2 });
    pools.push(other);
    const [a, b] = await Promise.all([migratePostgres(sql), migratePostgres(other)]);
    expect([...a, ...b].sort()).toEqual(SQLITE_FILES);
    expect(await sql.value('SELECT count(*) FROM schema_migrations')).toBe(SQLITE_FILES.length);
  });

  it('refuses a database from a newer build, and names the failing file and statement', async () => {
    const { sql } = await emptyDatabase();
    await migratePostgres(sql);
    await sql.run(
      "INSERT INTO schema_migrations (version, name, applied_at) VALUES (99, '099_future.sql', 'x')",
    );
    await expect(migratePostgres(sql)).rejects.toBeInstanceOf(NewerSchemaError);

    const fresh = await emptyDatabase();
    const dir = mkdtempSync(join(tmpdir(), 'efflux-pgmig-'));
    for (const name of readdirSync(defaultPostgresMigrationsDir()))
      if (name.startsWith('001'))
        writeFileSync(join(dir, name), readMigrations(defaultPostgresMigrationsDir())[0].sql);
    writeFileSync(
      join(dir, '002_broken.sql'),
      'CREATE FUNCTION f() RETURNS int LANGUAGE sql AS $$ SELECT 1; $$;\nCREATE TABLE ok (id int);\nALTER TABLE sites ADD COLUMN name TEXT;\n',
    );
    const e = await migratePostgres(fresh.sql, dir).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(MigrationError);
    expect((e as Error).message).toMatch(
      /^migration 002_broken\.sql failed at statement 3 \(line 3: "ALTER TABLE sites ADD COLUMN name TEXT"\): column "name" of relation "sites" already exists; the database was left at the previous version$/,
    );
    expect(await schemaVersion(fresh.sql)).toBe(1);
    expect(await fresh.sql.value("SELECT to_regclass('ok') IS NULL")).toBe(true);
  });
});
