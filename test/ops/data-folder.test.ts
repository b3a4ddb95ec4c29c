/**
 * The operator's safeguards against real processes: one server per data folder, a backup taken
 * while uploads run and checked on its own, restore refused beside a running server and then
 * done, `efflux check`, and an older build refusing a newer database.
 */
import Database from 'better-sqlite3';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { checkDatabase, rowCounts } from '../../server/store/maintenance.js';
import { SqliteSql } from '../../server/store/sqlite-sql.js';
import { eff, envFor, serve, stop, type Served } from './serve-process.js';

const base = mkdtempSync(join(tmpdir(), 'efflux-ops-'));
const dataDir = join(base, 'data');
const env = envFor(dataDir);
const running: Served[] = [];
afterAll(() => running.forEach((s) => s.child.exitCode === null && s.child.kill('SIGKILL')));

async function upload(s: Served, vesselId: number, i: number) {
  const form = new FormData();
  form.append(
    'log',
    new Blob([`t,level\n0,2.0\n1,1.9\n2,1.${i}\n` + '3,1.7\n'.repeat(3000)]),
    `run-${i}.csv`,
  );
  const res = await fetch(`${s.base}/api/vessels/${vesselId}/tests`, {
    method: 'POST',
    headers: { authorization: `Bearer ${s.token}` },
    body: form,
  });
  return res.status;
}

describe('one data folder, one server; backup, restore, check', () => {
  const backupFile = join(base, 'backup-1.sqlite');

  it('a second serve on the same folder exits 2 naming the first; a backup made during uploads checks out', async () => {
    const first = await serve(env);
    running.push(first);
    expect(first.token).toMatch(/^efx_/);

    const second = await eff(['serve', '--data', dataDir], env);
    expect(second.code).toBe(2);
    expect(second.stderr.trim().split('\n')).toHaveLength(1);
    expect(second.stderr).toContain(`pid ${first.child.pid} on ${hostname()}`);
    expect(second.stderr).toMatch(/started \d{4}-\d\d-\d\dT/);

    const restoreBeside = await eff(
      ['restore', join(base, 'whatever.sqlite'), '--data', dataDir],
      env,
    );
    expect(restoreBeside.code).toBe(2);
    expect(restoreBeside.stderr).toContain(`pid ${first.child.pid}`);

    const v = await fetch(`${first.base}/api/vessels`, {
      method: 'POST',
      headers: { authorization: `Bearer ${first.token}`, 'content-type': 'application/json' },
      body: JSON.stringify({
        name: 'K-2',
        shape: { kind: 'vertical-cylinder', diameterM: 2 },
        outlet: { boreM: 0.02, elevationM: 0 },
      }),
    });
    const vesselId = (await v.json()).id;
    for (let i = 0; i < 5; i++) expect(await upload(first, vesselId, i)).toBe(201);

    // uploads keep coming while the backup runs (a concurrent writer in another process)
    let stopUploads = false;
    let during = 0;
    const writer = (async () => {
      for (let i = 100; !stopUploads; i++) if ((await upload(first, vesselId, i)) === 201) during++;
    })();
    await new Promise((r) => setTimeout(r, 50));
    const b = await eff(['backup', '--out', backupFile, '--data', dataDir], env);
    stopUploads = true;
    await writer;
    expect(b.stderr).toBe('');
    expect(b.code).toBe(0);
    expect(b.stdout).toMatch(/copy checked: integrity ok, audit chain intact, row counts equal/);
    expect(during).toBeGreaterThan(0);

    // checked again here, on its own: sound, and a consistent snapshot (every test has its fit,
    // every test's bytes are there, the audit chain covers every upload in it)
    const copy = new Database(backupFile, { readonly: true });
    const c = await checkDatabase(new SqliteSql(copy));
    expect(c).toMatchObject({ ok: true, problems: [] });
    const n = await rowCounts(new SqliteSql(copy));
    expect(n.drain_tests).toBeGreaterThanOrEqual(5);
    expect(n.fits).toBe(n.drain_tests);
    expect(
      copy.prepare("SELECT count(*) FROM audit_log WHERE action = 'test.upload'").pluck().get(),
    ).toBe(n.drain_tests);
    copy.close();
    expect(existsSync(`${backupFile}.partial`)).toBe(false);

    const again = await eff(['backup', '--out', backupFile, '--data', dataDir], env);
    expect(again.code).toBe(2); // never overwrites a file
    expect(again.stderr).toMatch(/already exists/);

    expect(await stop(first)).toBe(0);
  }, 120_000);

  it('efflux check reports integrity, schema and chain; restore puts a backup back and keeps what it replaced', async () => {
    const ok = await eff(['check', '--data', dataDir], env);
    expect(ok.code).toBe(0);
    expect(ok.stdout).toMatch(/^integrity: ok$/m);
    expect(ok.stdout).toMatch(/^schema: database \d+, this build \d+$/m);
    expect(ok.stdout).toMatch(/^audit chain intact: \d+ entries/m);

    const live = new Database(join(dataDir, 'efflux.sqlite'), { readonly: true });
    const liveTests = (await rowCounts(new SqliteSql(live))).drain_tests;
    live.close();
    const copy = new Database(backupFile, { readonly: true });
    const backupTests = (await rowCounts(new SqliteSql(copy))).drain_tests;
    copy.close();
    expect(liveTests).toBeGreaterThan(backupTests); // uploads went on after the snapshot

    const r = await eff(['restore', backupFile, '--data', dataDir], env);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/kept as .*efflux-replaced-/);
    const restored = new Database(join(dataDir, 'efflux.sqlite'), { readonly: true });
    expect((await rowCounts(new SqliteSql(restored))).drain_tests).toBe(backupTests);
    restored.close();
    const kept = /kept as (\S+)/.exec(r.stdout)![1];
    const old = new Database(kept, { readonly: true });
    expect((await rowCounts(new SqliteSql(old))).drain_tests).toBe(liveTests);
    old.close();
    expect((await eff(['check', '--data', dataDir], env)).code).toBe(0);
  }, 60_000);

  it('an older build refuses a newer database: serve exits 2 with one line naming both versions; check says so', async () => {
    const newer = join(base, 'newer');
    mkdirSync(newer);
    copyFileSync(backupFile, join(newer, 'efflux.sqlite'));
    const db = new Database(join(newer, 'efflux.sqlite'));
    const build = db.prepare('SELECT max(version) FROM schema_migrations').pluck().get() as number;
    db.prepare('INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)').run(
      build + 5,
      `${build + 5}_later.sql`,
      '2030-01-01T00:00:00Z',
    );
    db.close();
    const s = await eff(['serve', '--data', newer], env);
    expect(s.code).toBe(2);
    const lines = s.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toContain(`schema version ${build + 5}, newer than this build's ${build}`);
    const tok = await eff(['token', 'create', '--role', 'admin', '--name', 'x'], envFor(newer));
    expect(tok.code).toBe(2);
    const c = await eff(['check', '--data', newer], env);
    expect(c.code).toBe(1);
    expect(c.stderr).toContain(`newer than this build's ${build}`);
    const notThere = await eff(['check', '--data', join(base, 'nothing-here')], env);
    expect(notThere.code).toBe(2);
    expect(notThere.stderr).toMatch(/no efflux database at/);
  }, 60_000);
});
