import { spawn, type ChildProcess } from 'node:child_process';
import { appendFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import type { AnalyzeRunner } from '../../server/jobs/pool.js';
import { testApp, type TestApp } from '../http/helpers.js';
import { root } from './run-cli.js';

const logBytes = readFileSync(resolve(root, 'sample-data/fb1-2026-03-10-preamble.csv'));
const fb1 = JSON.parse(
  readFileSync(resolve(root, 'sample-data/backwash-tank-fb1.vessel.json'), 'utf8'),
);
const engine: AnalyzeRunner = async (req) => analyzeDrainTest(req);

let t: TestApp;
let base: string;
let vesselId: number;
beforeAll(async () => {
  t = await testApp({ analyze: engine, liveRefitMs: 500 });
  base = await t.app.listen({ host: '127.0.0.1', port: 0 });
  vesselId = (
    await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: fb1,
    })
  ).json().id;
});
afterAll(() => t.app.close());

function watch(args: string[]): {
  child: ChildProcess;
  out: () => string;
  err: () => string;
  exited: Promise<number | null>;
} {
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', resolve(root, 'server/cli/main.ts'), 'watch', ...args],
    {
      cwd: root,
      env: { ...process.env, NO_COLOR: '1', EFFLUX_TOKEN: t.tokens.technician },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  let out = '';
  let err = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (err += d));
  return {
    child,
    out: () => out,
    err: () => err,
    exited: new Promise((r) => child.on('exit', (code) => r(code))),
  };
}

const until = async (what: string, f: () => Promise<boolean> | boolean, ms = 60_000) => {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (await f()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
};

/** Offsets just past the n-th line feed. */
const afterLine = (n: number) => {
  let seen = 0;
  for (let i = 0; i < logBytes.length; i++) if (logBytes[i] === 0x0a && ++seen === n) return i + 1;
  return logBytes.length;
};

describe('efflux watch', () => {
  it('tails a growing file; killed midway and resumed with --live, the stored test is the file byte for byte', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-watch-'));
    const file = join(dir, 'fb1-live.csv');
    writeFileSync(file, logBytes.subarray(0, afterLine(400)));
    const first = watch([file, '--vessel', String(vesselId), '--to', base, '--poll', '200ms']);
    await until('the live id', () => /^[0-9a-f-]{36}\n/.test(first.out()));
    const id = first.out().trim();
    const held = async () =>
      (
        await t.app.inject({ method: 'GET', url: `/api/live/${id}`, headers: t.auth('auditor') })
      ).json().receivedBytes as number;
    await until('the first rows', async () => (await held()) === afterLine(400));
    // a half-written row is not sent until its line feed arrives
    appendFileSync(file, logBytes.subarray(afterLine(400), afterLine(400) + 10));
    await new Promise((r) => setTimeout(r, 600));
    expect(await held()).toBe(afterLine(400));
    appendFileSync(file, logBytes.subarray(afterLine(400) + 10, afterLine(1200)));
    await until('rows up to 1200', async () => (await held()) >= afterLine(900));
    first.child.kill('SIGKILL');
    await first.exited;
    appendFileSync(file, logBytes.subarray(afterLine(1200), afterLine(1800)));

    const second = watch([
      file,
      '--live',
      id,
      '--to',
      base,
      '--poll',
      '200ms',
      '--close-after',
      '2s',
    ]);
    await until('the resumed sender', () => /resuming live test/.test(second.err()));
    appendFileSync(file, logBytes.subarray(afterLine(1800)));
    const code = await second.exited;
    expect(code, second.err()).toBe(0);
    const m = /stored as test (\d+)/.exec(second.err());
    expect(m, second.err()).not.toBeNull();
    const raw = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${m![1]}/raw`,
      headers: t.auth('auditor'),
    });
    expect(raw.rawPayload.length).toBe(logBytes.length);
    expect(Buffer.compare(raw.rawPayload, logBytes)).toBe(0);
  }, 120_000);

  it('refuses a missing service or token with one line (exit 2)', async () => {
    const w = watch(['x.csv', '--vessel', '1']);
    expect(await w.exited).toBe(2);
    expect(w.err()).toMatch(/--to URL/);
  });
});
