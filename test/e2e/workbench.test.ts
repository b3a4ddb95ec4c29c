/**
 * The web workbench in a real browser (Debian's chromium through playwright-core) against a real
 * server process with the demo data: sign in → fleet → vessel → new test with a sample file →
 * adjust the window → fit → approve → the new point on the vessel's chart; then an auditor, who
 * is offered no edit controls. Screenshots of each page go to test-output/screenshots/.
 * The bundle is built here into a temporary folder (EFFLUX_WEB_ROOT), so no separate step is needed.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildWeb } from '../../web/build.js';
import { testingOnPostgres } from '../support/store.js';
import { createTestDatabase, type TestDatabase } from '../support/postgres.js';
import {
  dragAcross,
  guardBrowser,
  haveBrowser,
  launch,
  root,
  shots,
  unexpected,
} from './browser.js';

const SAMPLE = join(root, 'sample-data/fb1-2026-03-26-leaking-inlet.csv');
guardBrowser('workbench flow');

describe.skipIf(!haveBrowser)('the web workbench in a browser', () => {
  let server: ChildProcess;
  let base = '';
  let adminToken = '';
  let context: BrowserContext;
  let page: Page;
  const dataDir = mkdtempSync(join(tmpdir(), 'efflux-e2e-data-'));
  const webRoot = mkdtempSync(join(tmpdir(), 'efflux-e2e-web-'));
  let profile = '';
  const env = {
    ...process.env,
    EFFLUX_DATA_DIR: dataDir,
    EFFLUX_WEB_ROOT: webRoot,
    PORT: '0',
    HOST: '127.0.0.1',
    EFFLUX_LOG: 'warn',
    EFFLUX_WORKERS: '1',
    EFFLUX_DEMO: '1',
  };
  let problems: string[] = [];
  // the vitest project `postgres`: the server keeps everything in a new PostgreSQL database (and
  // migrates it itself), the data folder holds only the first admin token's file
  let database: TestDatabase | null = null;

  beforeAll(async () => {
    if (testingOnPostgres()) {
      database = await createTestDatabase();
      Object.assign(env, { EFFLUX_DATABASE_URL: database.url });
    }
    mkdirSync(shots, { recursive: true });
    await buildWeb(webRoot);
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
        if (m && /\/api\/docs\n/.test(out)) {
          base = m[1];
          resolve();
        }
      });
      server.stderr!.on('data', (d) => (out += d));
      server.once('exit', (code) =>
        reject(new Error(`server exited ${code} before listening:\n${out}`)),
      );
    });
    // the records are where the project says (the banner names the database, never a password)
    if (database) expect(out).toContain(`(database ${database.url}; DEMO data`);
    else expect(out).toContain(`(data in ${dataDir}; DEMO data`);
    adminToken = readFileSync(join(dataDir, 'first-admin-token.txt'), 'utf8').trim(); // never in the output
    ({ context, page, profile, problems } = await launch());
  }, 180_000);

  afterAll(async () => {
    await context?.close();
    if (server && server.exitCode === null) {
      const exited = new Promise((r) => server.once('exit', r));
      process.kill(server.pid!, 'SIGTERM');
      await exited;
    }
    for (const d of [dataDir, webRoot, profile]) rmSync(d, { recursive: true, force: true });
    await database?.drop();
  });

  const shot = (name: string) =>
    page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });

  async function signIn(token: string) {
    await page.goto(`${base}/`);
    await page.getByLabel('Access token').fill(token);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
  }

  it('sign-in → new test → adjust the window → fit → approve → the new point on the chart', async () => {
    await page.goto(`${base}/`);
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await shot('01-sign-in');
    // a wrong token is refused in words, not with a blank page
    await page.getByLabel('Access token').fill('not-a-token');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').waitFor();
    await signIn(adminToken);
    await page.locator('.demo-banner').getByText('Demo data').waitFor(); // the demo's folder says so

    // fleet: every demo vessel, and the search narrows it
    await page.locator('table.fleet tbody tr').first().waitFor();
    expect(await page.locator('table.fleet tbody tr').count()).toBeGreaterThanOrEqual(8);
    await shot('02-fleet');
    await page.getByLabel('Search').fill('backwash');
    expect(await page.locator('table.fleet tbody tr').count()).toBe(1);

    // vessel page: drawing and the Cd history
    await page.getByRole('link', { name: 'Backwash tank FB-1' }).click();
    await page.locator('svg.vessel-drawing').waitFor();
    const history = page.locator('.chart[id^="history-"]').first();
    await history.locator('canvas').waitFor();
    const approvedBefore = Number(await history.getAttribute('data-approved'));
    await shot('03-vessel');

    // new test: the caution, the file, the preview
    await page.getByRole('link', { name: 'New drain test' }).click();
    await expect(page.locator('.notice-caution').textContent()).resolves.toContain(
      'not a certification',
    );
    await page.getByLabel('Logger file').setInputFiles(SAMPLE);
    const detected = page.getByRole('table', { name: 'Columns found' });
    const fallback = page.getByText('does not offer a preview');
    await detected.or(fallback).waitFor();
    const hasPreview = await detected.isVisible();

    // adjust the window: drag across the whole-log chart when there is one, else type the times
    if (hasPreview) {
      const before = Number(await page.locator('#win-start').inputValue());
      await dragAcross(page, '#log-chart .u-over', 0.12, 0.8);
      const after = Number(await page.locator('#win-start').inputValue());
      expect(after).not.toBe(before);
      await expect(page.locator('.window-fields .hint').textContent()).resolves.toContain(
        'Your window',
      );
    }
    await page.locator('#win-start').fill('150');
    await page.locator('#win-start').dispatchEvent('change');
    await page.locator('#win-end').fill('2000');
    await page.locator('#win-end').dispatchEvent('change');
    await page.getByLabel('Fit a steady inflow').check();
    await page.getByLabel('Operator').fill('e2e <b>tester</b>');
    await shot('04-new-test');

    // fit (the fit page links its PDF without asking for it: no HEAD or GET of report.pdf)
    const reportRequests: string[] = [];
    const onRequest = (r: { url(): string; method(): string }) => {
      if (r.url().includes('/report.pdf')) reportRequests.push(`${r.method()} ${r.url()}`);
    };
    page.on('request', onRequest);
    await page.getByRole('button', { name: 'Fit this test' }).click();
    // the demo already holds this file for the vessel: the service answers 409 naming that test,
    // and the page offers to store it again (allowDuplicate=true, recorded in the audit log)
    const again = page.getByRole('button', { name: 'Store it again anyway' });
    await again.waitFor({ timeout: 120_000 });
    await expect(page.locator('.notice-caution').last().textContent()).resolves.toMatch(
      /already stored: test \d+/,
    );
    await again.click();
    await page.waitForURL(/#\/fits\/\d+$/, { timeout: 120_000 });
    await page.getByRole('heading', { name: 'Readings and the fitted drain curve' }).waitFor();
    await page.locator('#fit-chart canvas').waitFor();
    await page.locator('#residual-chart canvas').waitFor();
    await expect(page.locator('.headline').textContent()).resolves.toContain(
      'chosen by the person (150..2000 s)',
    );
    const fitId = Number(/#\/fits\/(\d+)$/.exec(page.url())![1]);
    const win = await page.evaluate(
      async (id) => (await (await fetch(`/api/fits/${id}`)).json()).result.window,
      fitId,
    );
    expect(win.startS).toBeGreaterThanOrEqual(150);
    expect(win.endS).toBeLessThanOrEqual(2000);
    await expect(
      page.getByRole('link', { name: 'Download the report (PDF)' }).getAttribute('href'),
    ).resolves.toBe(`/api/fits/${fitId}/report.pdf`);
    page.off('request', onRequest);
    expect(reportRequests).toEqual([]);
    await shot('05-fit');

    // the uncertainty budget: the same strings as the fit JSON (which the CLI and the PDF print)
    const result = await page.evaluate(
      async (id) => (await (await fetch(`/api/fits/${id}`)).json()).result,
      fitId,
    );
    const cells = await page
      .locator('table.budget tbody tr')
      .evaluateAll((rows) =>
        rows.map((r) => Array.from(r.querySelectorAll('td'), (td) => td.textContent)),
      );
    expect(cells).toEqual(result.budget.table.rows);
    // the drain-time calculator: 3 m → 1 m against 2A(√H0 − √H1)/(Cd·a·√(2g)) (Torricelli, constant area)
    await page.getByLabel('From level, m').fill('3');
    await page.getByLabel('To level, m').fill('1');
    await page.getByRole('button', { name: 'Work it out' }).click();
    const answer = await page.locator('#drain-time-answer').textContent();
    const seconds = Number(/^([\d.]+) s, about/.exec(answer ?? '')![1]);
    const A = (Math.PI * 3.2 ** 2) / 4;
    const exact =
      ((2 * A) / (result.effectiveAreaM2.value * Math.sqrt(2 * 9.80665))) *
      (Math.sqrt(2.9) - Math.sqrt(0.9));
    expect(Math.abs(seconds - exact) / exact).toBeLessThan(1e-3);
    expect(answer).toMatch(/95 % interval [\d.]+ s to [\d.]+ s/);

    // four eyes: the admin uploaded this test, so the approval is refused until an admin allows
    // self-review for the site (a one-person site); the approval is then marked as a self-review
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.getByText('four eyes').first().waitFor();
    const allowed = await page.evaluate(async (id) => {
      const f = await (await fetch(`/api/fits/${id}`)).json();
      const v = await (await fetch(`/api/vessels/${f.vesselId}`)).json();
      const r = await fetch(`/api/sites/${encodeURIComponent(v.site)}/settings`, {
        method: 'PUT',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ selfReviewAllowed: true }),
      });
      return r.status;
    }, fitId);
    expect(allowed).toBe(200);
    // approve with a comment (markup typed in a comment stays text)
    await page
      .getByLabel('Comment (kept with the fit)')
      .fill('Window checked by eye <script>x</script>');
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.locator('.title-row .badge-approved').waitFor();
    await page.getByText('Self-review: approved by the person who uploaded').waitFor();
    await expect(page.locator('.review blockquote').textContent()).resolves.toBe(
      'Window checked by eye <script>x</script>',
    );
    await shot('06-fit-approved');

    // the vessel's chart has the new point
    await page
      .getByRole('navigation', { name: 'Where you are' })
      .getByRole('link', { name: 'Backwash tank FB-1' })
      .click();
    const history2 = page.locator('.chart[id^="history-"]').first();
    await history2.locator('canvas').waitFor();
    expect(Number(await history2.getAttribute('data-approved'))).toBe(approvedBefore + 1);
    await expect(page.locator('main table').last().textContent()).resolves.toContain(
      'e2e <b>tester</b>',
    );
    await shot('07-vessel-after');

    expect(problems.filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
    // the 409 (the file already stored) and the 403 (four eyes) above were asked for; nothing else
    const asked = /status of (409|403)/;
    expect(problems.filter((p) => asked.test(p))).toHaveLength(2);
    expect(unexpected(problems).filter((p) => !asked.test(p))).toEqual([]);
  }, 240_000);

  it('an auditor sees the same pages with no edit controls', async () => {
    const made = spawnSync(
      process.execPath,
      [
        '--import',
        'tsx',
        join(root, 'server/cli/main.ts'),
        'token',
        'create',
        '--role',
        'auditor',
        '--name',
        'e2e-auditor',
      ],
      { cwd: root, env, encoding: 'utf8' },
    );
    expect(made.status).toBe(0);
    await page.goto(`${base}/#/`);
    const out = page.getByRole('button', { name: 'Sign out' });
    if (await out.isVisible()) {
      await out.click();
      // the sign-out request must finish before the next page load asks for the session
      await page.getByLabel('Access token').waitFor();
    }
    await signIn(made.stdout.trim());
    await page.getByRole('link', { name: 'Backwash tank FB-1' }).click();
    await page.locator('svg.vessel-drawing').waitFor();
    expect(await page.getByRole('link', { name: 'New drain test' }).count()).toBe(0);
    await page.locator('a.badge').first().click();
    await page.getByRole('heading', { name: 'Parameters', exact: true }).waitFor();
    expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Fit again' }).count()).toBe(0);
    await shot('08-auditor-fit');

    // every demo vessel's drawing (every shape kind) has its outline, its outlet and its sensor mark
    await page.goto(`${base}/#/`);
    const links = page.locator('table.fleet tbody th a');
    await links.first().waitFor();
    const names = await links.allTextContents();
    mkdirSync(join(shots, 'drawings'), { recursive: true });
    for (const name of names) {
      await page.goto(`${base}/#/`);
      await page.getByRole('link', { name, exact: true }).click();
      const drawing = page.locator('svg.vessel-drawing');
      await drawing.waitFor();
      expect(await drawing.locator('polygon').count()).toBe(1);
      await expect(drawing.textContent()).resolves.toMatch(/outlet/);
      await expect(drawing.textContent()).resolves.toMatch(/sensor zero|gauge face/);
      await page.locator('figure.drawing').screenshot({
        path: join(shots, 'drawings', `${name.replace(/[^A-Za-z0-9-]+/g, '_')}.png`),
      });
    }
  }, 120_000);
});
