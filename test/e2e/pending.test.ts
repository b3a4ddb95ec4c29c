/**
 * Tests waiting for analysis on the vessel page: the failures shown, "Analyse again" (fails while
 * the stand-in engine is not ready, then succeeds) and "Withdraw" with a reason; no demo banner on
 * a real folder. A real server on a prepared data folder, the stand-in engine of test/ops.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { buildWeb } from '../../web/build.js';
import { VESSEL_FILE } from '../http/helpers.js';
import { guardBrowser, haveBrowser, launch, root, shots, unexpected } from './browser.js';
import { openTestStore } from '../support/store.js';

guardBrowser('pending tests');

describe.skipIf(!haveBrowser)('tests waiting for analysis, in the workbench', () => {
  const base = mkdtempSync(join(tmpdir(), 'efflux-e2e-pending-'));
  const dataDir = join(base, 'data');
  const webRoot = join(base, 'web');
  const gate = join(base, 'gate');
  let server: ChildProcess;
  let url = '';
  let token = '';
  let vesselId = 0;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let problems: string[] = [];

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true });
    await buildWeb(webRoot);
    const store = await openTestStore({ dataDir });
    token = (await store.users.createToken(SYSTEM_ACTOR, 'admin', 'admin')).token;
    vesselId = (await store.vessels.create(SYSTEM_ACTOR, VESSEL_FILE as never)).id;
    const put = async (name: string, body: string) =>
      await store.tests.createPending(SYSTEM_ACTOR, {
        vesselId,
        outletId: null,
        log: { bytes: Buffer.from(body), fileName: name },
        settings: {},
      });
    await put('late-engine.csv', 't,level\nFAIL_UNTIL_GATE\n0,2\n1,1.9\n');
    await put('wrong-logger.csv', 't,level\nFAIL\n0,2\n1,1.9\n');
    await store.close();
    const env = {
      ...process.env,
      EFFLUX_DATA_DIR: dataDir,
      EFFLUX_WEB_ROOT: webRoot,
      PORT: '0',
      HOST: '127.0.0.1',
      EFFLUX_LOG: 'warn',
      EFFLUX_WORKERS: '1',
      EFFLUX_ANALYZE_MODULE: new URL('../ops/gated-analyze.ts', import.meta.url).href,
      EFFLUX_TEST_GATE: gate,
    };
    server = spawn(
      process.execPath,
      ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'serve'],
      { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] },
    );
    let out = '';
    await new Promise<void>((resolve, reject) => {
      server.stdout!.on('data', (d) => {
        out += d;
        const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
        if (m) url = m[1];
        // the background resume has tried both tests once
        if (
          url &&
          /pending tests from an earlier run: 0 analysed, 0 refused and withdrawn, 2 failed again/.test(
            out,
          )
        )
          resolve();
      });
      server.stderr!.on('data', (d) => (out += d));
      server.once('exit', (code) => reject(new Error(`server exited ${code}:\n${out}`)));
    });
    ({ context, page, profile, problems } = await launch());
  }, 180_000);

  afterAll(async () => {
    await context?.close();
    if (server && server.exitCode === null) {
      const exited = new Promise((r) => server.once('exit', r));
      server.kill('SIGTERM');
      await exited;
    }
    for (const d of [base, profile]) if (d) rmSync(d, { recursive: true, force: true });
  });

  it('shows the failures; Analyse again fails, then succeeds; Withdraw needs a reason and takes the test back', async () => {
    await page.goto(`${url}/`);
    await page.getByLabel('Access token').fill(token);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
    expect(await page.locator('.demo-banner').count()).toBe(0); // a real folder: no demo banner
    await page.goto(`${url}/#/vessels/${vesselId}`);
    const section = page.locator('section.pending-tests');
    await section.getByRole('heading', { name: 'Tests waiting for analysis' }).waitFor();
    const late = section.getByRole('row').filter({ hasText: 'late-engine.csv' });
    const wrong = section.getByRole('row').filter({ hasText: 'wrong-logger.csv' });
    await expect.poll(() => late.textContent()).toContain('failed 1 time;');
    expect(await wrong.textContent()).toContain('the stand-in engine failed on purpose');
    await page.screenshot({ path: join(shots, 'pending-01-waiting.png'), fullPage: true });

    // the engine is not ready: the retry fails and says so; the count goes up
    await late.getByRole('button', { name: 'Analyse again' }).click();
    await section.getByText('could not complete the request').waitFor();
    writeFileSync(gate, '');
    await page.reload();
    await late.getByRole('button', { name: 'Analyse again' }).click();
    await late.waitFor({ state: 'detached' });

    // withdraw: a reason first
    await wrong.getByRole('button', { name: 'Withdraw' }).click();
    await section.getByText('Give a reason to withdraw the test').waitFor();
    await wrong.getByRole('textbox').fill('logger clock was wrong; test repeated');
    await wrong.getByRole('button', { name: 'Withdraw' }).click();
    await section.waitFor({ state: 'detached' }); // nothing waits any more
    await page.screenshot({ path: join(shots, 'pending-02-done.png'), fullPage: true });

    const auth = { authorization: `Bearer ${token}` };
    const tests = await (
      await fetch(`${url}/api/vessels/${vesselId}/tests`, { headers: auth })
    ).json();
    expect(
      tests.items.map((t: { fileName: string; status: string }) => [t.fileName, t.status]),
    ).toEqual([['late-engine.csv', 'analysed']]);
    const audit = await (await fetch(`${url}/api/audit?limit=100`, { headers: auth })).json();
    const actions = audit.items.map((e: { action: string }) => e.action);
    expect(actions.filter((a: string) => a === 'test.retry')).toHaveLength(2);
    expect(audit.items.find((e: { action: string }) => e.action === 'test.withdraw').after).toEqual(
      { reason: 'logger clock was wrong; test repeated' },
    );
    expect(unexpected(problems).filter((p) => !/status of 500/.test(p))).toEqual([]);
  }, 120_000);
});
