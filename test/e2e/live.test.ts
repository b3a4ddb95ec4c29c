/**
 * Planning and a live drain test in a real browser against `efflux serve` with the demo data:
 * the plan page draws the predicted curve; a live test is opened on the page, the demo log
 * sample-data/fb1-2026-03-10-preamble.csv is written row batch by row batch into a growing file
 * that `efflux watch` tails to the service; the sender is killed midway and resumed with --live;
 * the page shows the fit and the "enough data" notice before the log ends; closing stores a test
 * whose raw bytes are the log's. Screenshots 20-… to 22-….
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { appendFileSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  guardBrowser,
  haveBrowser,
  launch,
  root,
  shots,
  startServer,
  unexpected,
  type RunningServer,
} from './browser.js';

guardBrowser('plan and live test');
const LOG = readFileSync(join(root, 'sample-data/fb1-2026-03-10-preamble.csv'));
const lineEnds: number[] = [];
for (let i = 0; i < LOG.length; i++) if (LOG[i] === 0x0a) lineEnds.push(i + 1);

describe.skipIf(!haveBrowser)('plan and live test pages in a browser', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let problems: string[] = [];
  let fb1 = 0;
  const senders: ChildProcess[] = [];

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true });
    process.env.EFFLUX_LIVE_REFIT_S = '1';
    srv = await startServer();
    ({ context, page, profile, problems } = await launch());
    const vessels = await (
      await fetch(`${srv.base}/api/vessels?limit=100`, {
        headers: { authorization: `Bearer ${srv.adminToken}` },
      })
    ).json();
    fb1 = vessels.items.find((v: { name: string }) => v.name === 'Backwash tank FB-1').id;
  }, 240_000);

  afterAll(async () => {
    for (const s of senders) if (s.exitCode === null) s.kill('SIGKILL');
    await context?.close();
    await srv?.stop();
    if (profile) spawnSync('rm', ['-rf', profile]);
  });

  const shot = (name: string) =>
    page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });
  const api = async (path: string) =>
    (
      await fetch(`${srv.base}${path}`, { headers: { authorization: `Bearer ${srv.adminToken}` } })
    ).json();

  function sender(args: string[]): { child: ChildProcess; err: () => string } {
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'watch', ...args],
      {
        cwd: root,
        env: { ...process.env, EFFLUX_TOKEN: srv.adminToken, NO_COLOR: '1' },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    senders.push(child);
    let err = '';
    child.stderr!.on('data', (d) => (err += d));
    return { child, err: () => err };
  }

  const until = async (what: string, f: () => Promise<boolean> | boolean, ms = 90_000) => {
    const end = Date.now() + ms;
    while (Date.now() < end) {
      if (await f()) return;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`timed out waiting for ${what}`);
  };

  it('signs in and plans FB-1 from 3.5 m: the numbers, the target verdict and the drawn curve', async () => {
    await page.goto(`${srv.base}/`);
    await page.getByLabel('Access token').fill(srv.adminToken);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
    await page.goto(`${srv.base}/#/vessels/${fb1}`);
    await page.getByRole('link', { name: 'Plan a test' }).click();
    await page.getByLabel('Start level (m)').fill('3.5');
    await page.getByLabel('Target (%)').fill('0.2');
    await page.getByLabel('Discharge limit (L/s)').fill('8');
    await page.getByRole('button', { name: 'Plan' }).click();
    await page.locator('.plan-chart canvas').waitFor();
    const text = await page.locator('.plan-result').innerText();
    expect(text).toMatch(/peak outflow at opening\s+9\.92 L\/s/);
    expect(text).toMatch(/EXCEEDS the stated limit of 8 L\/s/);
    expect(text).toMatch(/Shortest test that meets the target/);
    await shot('20-plan');
  }, 60_000);

  it('a live test: fed by efflux watch (killed and resumed), fit and "enough data" before the log ends, closed into the same bytes', async () => {
    await page.goto(`${srv.base}/#/vessels/${fb1}/live`);
    await page.getByRole('button', { name: 'Open live test' }).click();
    await page.waitForURL(/#\/live\/[0-9a-f-]{36}$/);
    const id = /#\/live\/([0-9a-f-]{36})$/.exec(page.url())![1];
    const held = async () => (await api(`/api/live/${id}`)).receivedBytes as number;

    const dir = mkdtempSync(join(tmpdir(), 'efflux-e2e-live-'));
    const file = join(dir, 'fb1-live.csv');
    let written = 60; // the preamble and the first readings of the hold
    writeFileSync(file, LOG.subarray(0, lineEnds[written - 1]));
    let s = sender([file, '--live', id, '--to', srv.base, '--poll', '200ms']);
    await until(
      'the first rows on the service',
      async () => (await held()) === lineEnds[written - 1],
    );

    let enoughAt: number | null = null;
    let killed = false;
    while (written < lineEnds.length) {
      const next = Math.min(written + 20, lineEnds.length);
      appendFileSync(file, LOG.subarray(lineEnds[written - 1], lineEnds[next - 1]));
      written = next;
      await new Promise((r) => setTimeout(r, 120));
      if (enoughAt === null && (await page.locator('.live-enough .notice').isVisible()))
        enoughAt = written;
      if (!killed && written >= 1100) {
        // the sender dies midway (no goodbye); rows keep arriving in the file meanwhile
        await until('rows past 1000 on the service', async () => (await held()) >= lineEnds[999]);
        s.child.kill('SIGKILL');
        killed = true;
        await shot('21-live-midway');
        s = sender([file, '--live', id, '--to', srv.base, '--poll', '200ms']);
      }
    }
    expect(enoughAt, 'the enough-data notice came before the log ended').not.toBeNull();
    expect(enoughAt!).toBeLessThan(lineEnds.length);
    console.info(
      `browser: the enough-data notice was up with ${enoughAt} of ${lineEnds.length} lines written`,
    );
    expect(await page.locator('.live-headline').innerText()).toMatch(/^Cd = 0\.6\d+ ± 0\.0\d+/);
    await until('every byte on the service', async () => (await held()) === LOG.length);
    s.child.kill('SIGTERM');
    expect(s.err()).toMatch(/resuming live test/);
    await until(
      'the last rows drawn',
      async () =>
        (await page.locator('.live-rows').innerText()) === `${lineEnds.length} rows received`,
      20_000,
    );

    await page.getByRole('button', { name: 'Close and store the test' }).click();
    // the demo already holds this file for FB-1: the service answers 409 naming that test, as for an
    // upload, and the page offers to store it again (allowDuplicate=true)
    const again = page.getByRole('button', { name: 'Store it again anyway' });
    await again.waitFor({ timeout: 60_000 });
    await expect(page.locator('.notice-caution').last().textContent()).resolves.toMatch(
      /already stored: test \d+/,
    );
    await again.click();
    const link = page.getByRole('link', { name: 'Open its fit for review' });
    await link.waitFor({ timeout: 60_000 });
    await shot('22-live-closed');
    const testId = Number(
      /Stored as test (\d+)/.exec(
        await page.locator('.notice', { hasText: 'Stored as test' }).first().innerText(),
      )![1],
    );
    const raw = Buffer.from(
      await (
        await fetch(`${srv.base}/api/tests/${testId}/raw`, {
          headers: { authorization: `Bearer ${srv.adminToken}` },
        })
      ).arrayBuffer(),
    );
    expect(raw.length).toBe(LOG.length);
    expect(Buffer.compare(raw, LOG)).toBe(0);
    await link.click();
    await page.waitForURL(/#\/fits\/\d+$/);
    // the 409 (the file already stored) above was asked for; nothing else
    const asked = /status of 409/;
    expect(problems.filter((p) => asked.test(p))).toHaveLength(1);
    expect(unexpected(problems).filter((p) => !asked.test(p))).toEqual([]);
  }, 240_000);
});
