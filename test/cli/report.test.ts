import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readZip } from '../../server/render/zip.js';
import { reportFixture } from '../render/report-fixture.js';
import { effluxWithData } from './run-cli.js';

const efflux = effluxWithData;

let dataDir: string;
let fitId: number;
let outletId: number;
let logSha: string;

beforeAll(async () => {
  // the demo's invented backwash tank (sample-data/, fictional), two approved tests
  const fx = await reportFixture([
    { log: 'fb1-2026-03-10-preamble.csv', testedAt: '2026-03-10T08:15:00Z' },
    { log: 'fb1-2026-03-26-leaking-inlet.csv', testedAt: '2026-03-26T08:15:00Z' },
  ]);
  await fx.store.close();
  ({ dataDir, fitId, outletId, logSha256: logSha } = fx);
}, 60_000);
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

describe('efflux report', () => {
  let pdf: string;
  let json: string;
  it('writes a fit report as PDF and JSON, and the same bytes twice', () => {
    pdf = join(dataDir, 'fit.pdf');
    json = join(dataDir, 'fit.json');
    expect(efflux(dataDir, ['report', 'fit', String(fitId), '--out', pdf]).code).toBe(0);
    const first = createHash('sha256').update(readFileSync(pdf)).digest('hex');
    expect(efflux(dataDir, ['report', 'fit', String(fitId), '--out', pdf]).code).toBe(0);
    expect(createHash('sha256').update(readFileSync(pdf)).digest('hex')).toBe(first);
    expect(efflux(dataDir, ['report', 'fit', String(fitId), '--out', json, '--json']).code).toBe(0);
    const rep = JSON.parse(readFileSync(json, 'utf8'));
    expect(rep.rawFiles[0].sha256).toBe(logSha);
    expect(rep.software.gitCommit).toBe('test-commit');
  }, 60_000);

  it('verifies both files against the records', () => {
    for (const f of [pdf, json]) {
      const r = efflux(dataDir, ['report', 'verify', f]);
      expect(r.code, r.stdout + r.stderr).toBe(0);
      expect(r.stdout).toMatch(/MATCHES the records/);
      expect(r.stdout).toMatch(/ok {3}reproduce fit \d+: .*identical numbers/);
    }
    const o = join(dataDir, 'outlet.pdf');
    expect(efflux(dataDir, ['report', 'outlet', String(outletId), '--out', o]).code).toBe(0);
    expect(efflux(dataDir, ['report', 'verify', o]).code).toBe(0);
  }, 60_000);

  it('refuses an unknown fit with one line and exit 2', () => {
    const r = efflux(dataDir, ['report', 'fit', '9999', '--out', join(dataDir, 'x.pdf')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('names what differs when the stored fit was changed behind the service', () => {
    // someone with the database file drops the guard trigger and edits the row directly
    const db = new Database(join(dataDir, 'efflux.sqlite'));
    db.exec('DROP TRIGGER fits_immutable');
    const row = db.prepare('SELECT result FROM fits WHERE id = ?').get(fitId) as { result: string };
    const result = JSON.parse(row.result);
    result.dischargeCoefficient.value = 0.7;
    db.prepare('UPDATE fits SET result = ? WHERE id = ?').run(JSON.stringify(result), fitId);
    db.close();
    for (const f of [pdf, json]) {
      const r = efflux(dataDir, ['report', 'verify', f]);
      expect(r.code).toBe(1);
      expect(r.stdout).toMatch(/DOES NOT MATCH/);
      expect(r.stdout).toMatch(/FAIL records: .*results\.dischargeCoefficient\.value/);
      expect(r.stdout).toMatch(/FAIL reproduce fit \d+: .*dischargeCoefficient\.value/);
      expect(r.stdout).toMatch(
        /FAIL audit record of fit \d+: the stored fit result was changed after audit entry/,
      );
    }
    // restore, then change an audit entry instead
    const db2 = new Database(join(dataDir, 'efflux.sqlite'));
    db2.prepare('UPDATE fits SET result = ? WHERE id = ?').run(row.result, fitId);
    expect(efflux(dataDir, ['report', 'verify', pdf]).code).toBe(0);
    db2.exec('DROP TRIGGER audit_log_no_update');
    db2
      .prepare("UPDATE audit_log SET actor_name = 'someone else' WHERE action = 'fit.approve'")
      .run();
    db2.close();
    const r = efflux(dataDir, ['report', 'verify', pdf]);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/FAIL audit chain: broken at entry \d+/);
    expect(r.stdout).toMatch(/FAIL records: .*audit/); // the approver's name in the report changed too
  }, 90_000);
});

describe('efflux export', () => {
  it('writes a zip whose manifest hashes match its files', () => {
    const zipFile = join(dataDir, 'period.zip');
    const r = efflux(dataDir, [
      'export',
      '--from',
      '2026-03-01',
      '--to',
      '2026-03-31',
      '--out',
      zipFile,
    ]);
    expect(r.code, r.stderr).toBe(0);
    const zip = readFileSync(zipFile);
    const entries = readZip(zip);
    const names = entries.map((e) => e.name);
    expect(names).toContain('summary.csv');
    expect(names).toContain('audit-excerpt.jsonl');
    expect(names.filter((n) => n.endsWith('.pdf'))).toHaveLength(2);
    const manifest = JSON.parse(
      entries.find((e) => e.name === 'manifest.json')!.bytes.toString('utf8'),
    );
    for (const f of manifest.files) {
      const e = entries.find((x) => x.name === f.name)!;
      expect(createHash('sha256').update(e.bytes).digest('hex')).toBe(f.sha256);
    }
    expect(
      entries
        .find((e) => e.name === 'summary.csv')!
        .bytes.toString('utf8')
        .split('\r\n')[0],
    ).toMatch(/^fit_id,report_id/);
    // unzip is installed by .ci/run: a missing one fails here rather than skipping the check
    expect(spawnSync('unzip', ['-t', zipFile]).status).toBe(0);
    // a period with no tests is refused
    expect(
      efflux(dataDir, ['export', '--from', '2025-01-01', '--to', '2025-01-31', '--out', zipFile])
        .code,
    ).toBe(2);
  }, 60_000);
});
