/**
 * A real server process on a loopback port with its own data folder: killed with SIGKILL in the
 * middle of a stream of uploads, then restarted. Every upload that had been answered 201 must be
 * there, byte-identical, and the audit chain must still verify. Then a graceful stop (SIGTERM).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../../', import.meta.url));
const main = join(root, 'server/cli/main.ts');
const dataDir = mkdtempSync(join(tmpdir(), 'efflux-proc-'));
const env = {
  ...process.env,
  EFFLUX_DATA_DIR: dataDir,
  PORT: '0',
  HOST: '127.0.0.1',
  EFFLUX_DEMO: '0',
  EFFLUX_LOG: 'silent',
  EFFLUX_WORKERS: '1',
  // the HTTP mechanics are under test here, not the numbers: the small stand-in engine
  EFFLUX_ANALYZE_MODULE: new URL('./fake-analyze.ts', import.meta.url).href,
};
const children: ChildProcess[] = [];
afterAll(() => children.forEach((c) => c.exitCode === null && c.kill('SIGKILL')));

function start(): Promise<{
  child: ChildProcess;
  base: string;
  out: () => string;
  exited: Promise<number | null>;
}> {
  const child = spawn(process.execPath, ['--import', 'tsx', main, 'serve'], {
    cwd: root,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  children.push(child);
  // attached at once: the exit may come before anyone awaits it
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  let out = '';
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
      if (m && /\/api\/docs\n/.test(out)) resolve({ child, base: m[1], out: () => out, exited });
    });
    child.stderr!.on('data', (d) => (out += d));
    child.on('exit', (code) =>
      reject(new Error(`server exited ${code} before listening:\n${out}`)),
    );
  });
}

const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

async function upload(base: string, token: string, vesselId: number, i: number) {
  const body = Buffer.from(
    `t,level\n0,2.0\n1,1.9\n2,1.${String(i).padStart(4, '0')}\n` + '3,1.7\n'.repeat(2000),
  );
  const form = new FormData();
  form.append('log', new Blob([body]), `run-${i}.csv`);
  form.append('operator', 'crash-test');
  const res = await fetch(`${base}/api/vessels/${vesselId}/tests`, {
    method: 'POST',
    headers: { authorization: `Bearer ${token}` },
    body: form,
  });
  return {
    status: res.status,
    json: res.status === 201 ? await res.json() : null,
    sha256: sha(body),
  };
}

describe('a real server process', () => {
  it('keeps every upload answered 201 across a SIGKILL, and the audit chain verifies', async () => {
    const first = await start();
    // the first admin token is in a file readable by its owner only, never in the output
    const tokenFile = join(dataDir, 'first-admin-token.txt');
    const token = readFileSync(tokenFile, 'utf8').trim();
    expect(token).toMatch(/^efx_/);
    expect(first.out()).not.toContain(token);
    expect(statSync(tokenFile).mode & 0o077).toBe(0);
    const auth = { authorization: `Bearer ${token}`, 'content-type': 'application/json' };
    const v = await fetch(`${first.base}/api/vessels`, {
      method: 'POST',
      headers: auth,
      body: JSON.stringify({
        name: 'K-1',
        shape: { kind: 'vertical-cylinder', diameterM: 2 },
        outlet: { boreM: 0.02, elevationM: 0 },
      }),
    });
    expect(v.status).toBe(201);
    const vesselId = (await v.json()).id;

    const answered: { id: number; sha256: string }[] = [];
    let i = 0;
    let killed = false;
    let refusals = 0;
    const lane = async () => {
      while (!killed && refusals < 20) {
        const n = i++;
        try {
          const r = await upload(first.base, token, vesselId, n);
          if (r.status === 201) {
            expect(r.json.test.sha256).toBe(r.sha256);
            answered.push({ id: r.json.test.id, sha256: r.sha256 });
          } else refusals++;
        } catch {
          // the connection died with the process: this upload was never answered
        }
        if (answered.length >= 15 && !killed) {
          killed = true;
          first.child.kill('SIGKILL');
        }
      }
    };
    await Promise.all([lane(), lane(), lane(), lane()]);
    await first.exited;
    expect(first.child.signalCode).toBe('SIGKILL');
    expect(answered.length).toBeGreaterThanOrEqual(15);

    const second = await start();
    expect(second.out()).not.toContain('first start'); // not a first start
    for (const a of answered) {
      const t = await fetch(`${second.base}/api/tests/${a.id}`, { headers: auth });
      expect(t.status).toBe(200);
      expect((await t.json()).status).toBe('analysed');
      const raw = await fetch(`${second.base}/api/tests/${a.id}/raw`, { headers: auth });
      expect(sha(new Uint8Array(await raw.arrayBuffer()))).toBe(a.sha256);
    }
    const chain = await (await fetch(`${second.base}/api/audit/verify`, { headers: auth })).json();
    expect(chain.ok).toBe(true);

    // graceful stop: uploads in flight when SIGTERM arrives either finish (201, stored) or are refused
    const inFlight = [0, 1, 2].map((k) =>
      upload(second.base, token, vesselId, 10_000 + k).catch(() => ({
        status: 0,
        json: null,
        sha256: '',
      })),
    );
    await new Promise((r) => setTimeout(r, 20));
    second.child.kill('SIGTERM');
    const late = await Promise.all(inFlight);
    const code = await second.exited;
    expect(code).toBe(0);
    for (const r of late) expect([0, 201, 503]).toContain(r.status);

    const cli = spawnSync(process.execPath, ['--import', 'tsx', main, 'audit', 'verify'], {
      cwd: root,
      env,
      encoding: 'utf8',
    });
    expect(cli.stdout).toMatch(/audit chain intact/);
    expect(cli.status).toBe(0);
    const stored = late.filter((r) => r.status === 201);
    if (stored.length) {
      const Database = (await import('better-sqlite3')).default;
      const db = new Database(join(dataDir, 'efflux.sqlite'), { readonly: true });
      for (const r of stored)
        expect(
          db.prepare('SELECT count(*) FROM drain_tests WHERE log_sha256 = ?').pluck().get(r.sha256),
        ).toBe(1);
      db.close();
    }
  });

  it('efflux token create prints a working token; audit verify names a tampered entry', async () => {
    const tok = spawnSync(
      process.execPath,
      ['--import', 'tsx', main, 'token', 'create', '--role', 'auditor', '--name', 'ines'],
      { cwd: root, env, encoding: 'utf8' },
    );
    expect(tok.status).toBe(0);
    expect(tok.stdout.trim()).toMatch(/^efx_[\w-]{43}$/);
    const Database = (await import('better-sqlite3')).default;
    const db = new Database(join(dataDir, 'efflux.sqlite'));
    db.exec('DROP TRIGGER audit_log_no_update');
    db.prepare(`UPDATE audit_log SET actor_name = 'someone else' WHERE seq = 3`).run();
    db.close();
    const cli = spawnSync(process.execPath, ['--import', 'tsx', main, 'audit', 'verify'], {
      cwd: root,
      env,
      encoding: 'utf8',
    });
    expect(cli.status).toBe(1);
    expect(cli.stdout).toMatch(/BROKEN at entry 3/);
  });
});
