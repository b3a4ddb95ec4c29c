/** Migrations an operator can trust: a failure names file and statement; a copy is taken first; a newer database is refused. */
import Database from 'better-sqlite3';
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/store/db.js';
import {
  defaultMigrationsDir,
  MigrationError,
  NewerSchemaError,
  readMigrations,
  schemaVersion,
  splitStatements,
} from '../../server/store/migrate.js';
import { SqliteSql } from '../../server/store/sqlite-sql.js';
import { migrateSqlite } from '../store/helpers.js';
import { openTestStore } from '../support/store.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'efflux-mig-'));

describe('migration safety', () => {
  it('a failing migration names its file and the statement (number, line, text); the database stays at the previous version', async () => {
    const dir = tmp();
    writeFileSync(join(dir, '001_a.sql'), 'CREATE TABLE a (x INTEGER);\n');
    writeFileSync(
      join(dir, '002_b.sql'),
      "-- adds b\nCREATE TABLE b (y TEXT);\nINSERT INTO b VALUES ('one; two');\nCREATE TRIGGER b_t BEFORE UPDATE ON b\nBEGIN SELECT RAISE(ABORT, 'no; never'); END;\nALTER TABLE a ADD COLUMN x INTEGER;\nCREATE TABLE c (z);\n",
    );
    const db = new Database(':memory:');
    let err: unknown;
    try {
      await migrateSqlite(db, dir);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(MigrationError);
    expect((err as Error).message).toBe(
      'migration 002_b.sql failed at statement 4 (line 6: "ALTER TABLE a ADD COLUMN x INTEGER"): duplicate column name: x; the database was left at the previous version',
    );
    expect(await schemaVersion(new SqliteSql(db))).toBe(1);
    expect(
      db.prepare("SELECT name FROM sqlite_master WHERE name IN ('b', 'c', 'b_t')").all(),
    ).toEqual([]);
  });

  it("splits the project's own migrations into statements that each stand alone (triggers kept whole)", () => {
    for (const f of readMigrations(defaultMigrationsDir())) {
      const parts = splitStatements(f.sql);
      const db = new Database(':memory:');
      // each piece is one complete statement: SQLite prepares it without "incomplete input"
      for (const p of parts)
        expect(() => db.prepare(p.text), `${f.name} line ${p.line}`).not.toThrow(
          /incomplete input|more than one statement/,
        );
      const triggers = (f.sql.match(/CREATE TRIGGER/gi) ?? []).length;
      expect(parts.filter((p) => /^CREATE TRIGGER/i.test(p.text)).length).toBe(triggers);
    }
  });

  it('takes a copy into the data folder, named with both versions, before migrating an existing database', async () => {
    const all = readMigrations(defaultMigrationsDir());
    const older = tmp();
    for (const f of all.slice(0, -1)) writeFileSync(join(older, f.name), f.sql);
    const newest = tmp();
    for (const f of all) writeFileSync(join(newest, f.name), f.sql);
    const data = tmp();
    const first = openDatabase(data); // the repositories need the newest tables: the older build's schema only
    await migrateSqlite(first, older);
    first.close();
    const from = all.at(-2)!.version;
    const to = all.at(-1)!.version;
    expect(readdirSync(data).filter((n) => n.startsWith('efflux-before'))).toEqual([]); // a new database needs no copy
    await (
      await openTestStore({
        dataDir: data,
        migrationsDir: newest,
        now: () => '2026-12-05T04:45:00.000Z',
      })
    ).close();
    const copies = readdirSync(data).filter((n) => n.startsWith('efflux-before'));
    expect(copies).toEqual([`efflux-before-schema-${from}-to-${to}-20261205T044500.sqlite`]);
    const copy = new Database(join(data, copies[0]), { readonly: true });
    expect(await schemaVersion(new SqliteSql(copy))).toBe(from);
    copy.close();
  });

  it('refuses a database newer than the build, leaving it untouched', async () => {
    const data = tmp();
    await (await openTestStore({ dataDir: data })).close();
    const db = new Database(join(data, 'efflux.sqlite'));
    const build = await schemaVersion(new SqliteSql(db));
    db.prepare('INSERT INTO schema_migrations VALUES (?, ?, ?)').run(build + 1, 'next.sql', 'x');
    db.close();
    await expect(openTestStore({ dataDir: data })).rejects.toThrow(NewerSchemaError);
    await expect(openTestStore({ dataDir: data })).rejects.toThrow(
      `schema version ${build + 1}, newer than this build's ${build}`,
    );
    const again = new Database(join(data, 'efflux.sqlite'), { readonly: true });
    expect(await schemaVersion(new SqliteSql(again))).toBe(build + 1);
    again.close();
  });
});
