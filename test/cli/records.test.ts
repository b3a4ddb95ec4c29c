import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import { checkVesselFile } from '../../server/http/vessel-file.js';
import { fleetStatus } from '../../server/jobs/trend.js';
import { periodExport } from '../../server/render/period-export.js';
import { readZip } from '../../server/render/zip.js';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { reportFixture, SOFTWARE } from '../render/report-fixture.js';
import { effluxWithData } from './run-cli.js';
import { openTestStore } from '../support/store.js';

const efflux = effluxWithData;

let dataDir: string;
let fitId: number;
let testId: number;
let outletId: number;

beforeAll(async () => {
  const fx = await reportFixture([
    { log: 'fb1-2026-03-10-preamble.csv', testedAt: '2026-03-10T08:15:00Z' },
    { log: 'fb1-2026-03-26-leaking-inlet.csv', testedAt: '2026-03-26T08:15:00Z' },
  ]);
  await fleetStatus(fx.store, {}, Date.parse('2026-04-02T00:00:00Z')); // fills the status cache
  await fx.store.close();
  ({ dataDir, fitId, outletId } = fx);
  const db = new Database(join(dataDir, 'efflux.sqlite'));
  testId = db.prepare('SELECT test_id FROM fits WHERE id = ?').pluck().get(fitId) as number;
  db.close();
}, 90_000);

/** Runs fn on the database file as someone with write access would, the immutability triggers dropped. */
function tamper(fn: (db: Database.Database) => void) {
  const db = new Database(join(dataDir, 'efflux.sqlite'));
  db.exec('DROP TRIGGER IF EXISTS fits_immutable; DROP TRIGGER IF EXISTS drain_tests_immutable;');
  fn(db);
  db.close();
}

describe('verification covers every stored copy', () => {
  let report = '';
  it('an untouched database verifies: chain and stored copies', () => {
    const r = efflux(dataDir, ['audit', 'verify']);
    expect(r.code, r.stdout + r.stderr).toBe(0);
    expect(r.stdout).toMatch(/stored copies agree: 2 fits, 1 cached outlet statuses/);
    report = join(dataDir, 'before.json');
    expect(efflux(dataDir, ['report', 'fit', String(fitId), '--out', report, '--json']).code).toBe(
      0,
    );
    expect(efflux(dataDir, ['report', 'verify', report]).code).toBe(0);
  }, 90_000);

  it('an edited copied result column fails audit verify and report verify, naming the fit and the field', () => {
    let original = 0;
    tamper((db) => {
      original = db.prepare('SELECT cd FROM fits WHERE id = ?').pluck().get(fitId) as number;
      db.prepare('UPDATE fits SET cd = ? WHERE id = ?').run(original * 1.1, fitId);
    });
    const r = efflux(dataDir, ['audit', 'verify']);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain(`fits row ${fitId}: cd is`);
    const v = efflux(dataDir, ['report', 'verify', report]);
    expect(v.code).toBe(1);
    expect(v.stdout).toMatch(new RegExp(`stored copies: .*fits row ${fitId}: cd is`));
    tamper((db) => db.prepare('UPDATE fits SET cd = ? WHERE id = ?').run(original, fitId));
    expect(efflux(dataDir, ['audit', 'verify']).code).toBe(0);
  }, 90_000);

  it('an edited status-cache row or test date fails audit verify, naming the row and the field', () => {
    tamper((db) =>
      db
        .prepare(
          `UPDATE outlet_trend_status SET status = 'steady', body = json_set(body, '$.status', 'steady') WHERE outlet_id = ?`,
        )
        .run(outletId),
    );
    const before = efflux(dataDir, ['audit', 'verify']);
    // the cached word may already have been "steady"; the edited body or word must show either way
    tamper((db) =>
      db
        .prepare(`UPDATE outlet_trend_status SET days_to_threshold = 12345 WHERE outlet_id = ?`)
        .run(outletId),
    );
    const r = efflux(dataDir, ['audit', 'verify']);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain(`outlet_trend_status row ${outletId}: days_to_threshold is 12345`);
    expect(before.stdout + r.stdout).toMatch(
      /outlet_trend_status row \d+: (status|body|days_to_threshold)/,
    );
    tamper((db) =>
      db
        .prepare('UPDATE drain_tests SET tested_at = ? WHERE id = ?')
        .run('2026-01-01T00:00:00Z', testId),
    );
    const d = efflux(dataDir, ['audit', 'verify']);
    expect(d.stdout).toContain(`drain_tests row ${testId}: tested_at is "2026-01-01T00:00:00Z"`);
  }, 90_000);
});

describe('exports safe to open', () => {
  it('an export of fits whose fields start with = + - @ has no cell a spreadsheet would evaluate', async () => {
    const fx = await reportFixture();
    const store = fx.store;
    const v = await store.vessels.get(fx.vesselId);
    const spec = checkVesselFile({
      ...v.spec,
      name: '=HYPERLINK("http://example.invalid","open")',
      site: '+SUM(A1:A9)',
    });
    await store.vessels.update(SYSTEM_ACTOR, v.id, spec);
    const out = await periodExport(store, {}, SOFTWARE);
    const csv = readZip(out.zip)
      .find((e) => e.name === 'summary.csv')!
      .bytes.toString('utf8');
    const rows = Papa.parse<string[]>(csv, { skipEmptyLines: true }).data;
    const cells = rows.flat();
    expect(cells).toContain('\'=HYPERLINK("http://example.invalid","open")');
    expect(cells).toContain("'+SUM(A1:A9)");
    for (const cell of cells) {
      const isNumber = cell.trim() !== '' && Number.isFinite(Number(cell));
      if (!isNumber) expect(cell, cell).not.toMatch(/^[=+\-@\t\r]/);
    }
    await store.close();
  }, 90_000);
});

describe('efflux people, token and site', () => {
  it('adds a person limited to a site with a first token, changes, lists and revokes them; the token stops working', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-people-'));
    const add = efflux(dir, [
      'people',
      'add',
      'A. Fenwick (fictional)',
      '--role',
      'technician',
      '--sites',
      'north,south',
      '--token',
      'tablet',
    ]);
    expect(add.code, add.stderr).toBe(0);
    const token = add.stdout.trim().split('\n').pop()!;
    expect(token).toMatch(/^efx_/);
    expect(
      efflux(dir, [
        'people',
        'change',
        'A. Fenwick (fictional)',
        '--role',
        'engineer',
        '--all-sites',
      ]).stdout,
    ).toMatch(/engineer\s+every site/);
    expect(efflux(dir, ['people', 'add', 'x', '--role', 'boss']).code).toBe(2);
    const listed = efflux(dir, ['token', 'list', '--name', 'A. Fenwick (fictional)']);
    expect(listed.stdout).toMatch(/tablet/);
    const revoke = efflux(dir, ['people', 'revoke', 'A. Fenwick (fictional)']);
    expect(revoke.stdout).toMatch(/revoked/);
    const store = await openTestStore({ dataDir: dir });
    expect(await store.users.byToken(token)).toBeNull();
    expect((await store.sites.list()).map((s) => s.name)).toEqual(['north', 'south']);
    await store.close();
    expect(efflux(dir, ['site', 'self-review', 'north', 'on']).stdout).toMatch(
      /self-review allowed/,
    );
  }, 120_000);
});
