/**
 * The connected-vessels page, the vessel page's trend and the auditor's view, in a real browser
 * against `efflux serve` with the demo data. Screenshots go to test-output/screenshots/
 * (10-… to 15-…). Sample system: sample-data/systems/filter-chain.system.json with its two logs.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync } from 'node:fs';
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

const SYSTEMS = join(root, 'sample-data/systems');
guardBrowser('connected vessels, trend, audit');

describe.skipIf(!haveBrowser)('connected vessels, trend and audit pages in a browser', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let problems: string[] = [];

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true });
    srv = await startServer();
    ({ context, page, profile, problems } = await launch());
  }, 240_000);

  afterAll(async () => {
    await context?.close();
    await srv?.stop();
    if (profile) spawnSync('rm', ['-rf', profile]);
  });

  const shot = (name: string) =>
    page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });

  async function signIn(token: string) {
    await page.goto(`${srv.base}/`);
    const out = page.getByRole('button', { name: 'Sign out' });
    if (await out.isVisible()) {
      await out.click();
      // the sign-out request must finish before the sign-in form is used
      await page.getByLabel('Access token').waitFor();
    }
    await page.getByLabel('Access token').fill(token);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
  }

  it('connected vessels: system file and logs → joint fit → steady state → linear model with numbers', async () => {
    await signIn(srv.adminToken);
    await page.getByRole('link', { name: 'Connected vessels' }).click();
    await page.getByRole('heading', { level: 1, name: 'Connected vessels' }).waitFor();
    await page.getByLabel('System file').setInputFiles(join(SYSTEMS, 'filter-chain.system.json'));
    await page.locator('svg.system-schematic').waitFor();
    expect(await page.locator('svg.system-schematic rect.sch-vessel').count()).toBe(2);
    expect(await page.locator('svg.system-schematic .sch-free').count()).toBe(1);
    await page
      .getByLabel('Level log of Feed tank FT-1 (FT1)')
      .setInputFiles(join(SYSTEMS, 'ft1-2026-04-07.csv'));
    await page
      .getByLabel('Level log of Break tank BT-2 (BT2)')
      .setInputFiles(join(SYSTEMS, 'bt2-2026-04-07.csv'));
    await page.getByRole('button', { name: 'Fit all outlets together' }).click();
    await page.getByRole('heading', { name: 'Joint fit' }).waitFor({ timeout: 60_000 });
    await page.locator('#system-fit-FT1 canvas').waitFor();
    await page.locator('#system-fit-BT2 canvas').waitFor();
    const outlets = await page.getByRole('table', { name: 'Outlets', exact: true }).textContent();
    expect(outlets).toMatch(/FT1.*mm².*BT2/s);
    expect(await page.locator('table.corr tbody tr').count()).toBeGreaterThanOrEqual(4);
    await shot('10-systems-fit');

    // operating point: the system file gives no inflow and there is no inflow log, so the page
    // asks (no made-up default); 2.5 L/s into the top vessel → steady levels and the linear model
    const ft1 = page.getByLabel('Inflow into Feed tank FT-1 (FT1)');
    await expect(ft1.inputValue()).resolves.toBe('');
    await page.getByText('At what steady inflow?').waitFor();
    await ft1.fill('2.5 L/s');
    await page.getByRole('button', { name: 'Work out the operating point' }).click();
    const steady = page.getByRole('table', { name: 'Steady state' });
    await steady.waitFor({ timeout: 30_000 });
    const steadyText = (await steady.textContent())!;
    expect(steadyText).toMatch(/FT1.*\d\.\d+ ± \d\.\d+ m/s);
    expect(steadyText).toContain('2.5 L/s');
    const text = (await page.locator('#model-text').textContent())!;
    expect(text).not.toMatch(/\[[^\]]*;[^\]]*\]|eye\(/s);
    // every entry of A is a number: the row of FT1 under the table's header and rule
    const lines = text.split('\n');
    const head = lines.findIndex((l) => l.includes('per m in FT1, 1/s'));
    const aRow = lines[head + 2].trim().split(/\s{3,}/);
    expect(aRow[0]).toBe('FT1');
    expect(aRow.slice(1).map(Number).every(Number.isFinite)).toBe(true);
    expect(aRow.length).toBe(3);
    const tau = (await page.getByRole('table', { name: 'Time constants' }).textContent())!;
    expect(tau).toMatch(/BT2\d+(\.\d+)? ± \d+(\.\d+)? s/);
    expect(await page.locator('svg.system-schematic rect.sch-liquid').count()).toBe(2);
    await shot('11-systems-operating-point');

    // an inflow too large for the top vessel is an overflow warning, not a silent number
    await ft1.fill('20 L/s');
    await page.getByRole('button', { name: 'Work out the operating point' }).click();
    await page
      .locator('.system-operating .notice-error')
      .filter({ hasText: /overflow/ })
      .first()
      .waitFor({ timeout: 30_000 });
    await page
      .locator('.system-operating')
      .screenshot({ path: join(shots, '12-systems-overflow.png') });
  }, 180_000);

  it('vessel page: the trend of an outlet with a monthly history, and the maintenance form', async () => {
    // an outlet with approved tests; if the demo has none yet, approve a vessel's drafts through the API
    const pick = await page.evaluate(async () => {
      const fleet = await (await fetch('/api/fleet?limit=500')).json();
      const counts: { outletId: number; vesselId: number; n: number }[] = [];
      for (const item of fleet.items ?? []) {
        const t = await (await fetch(`/api/outlets/${item.outletId}/trend`)).json();
        counts.push({
          outletId: item.outletId,
          vesselId: item.vesselId,
          n: t.epochs.reduce((s: number, e: { series: unknown[] }) => s + e.series.length, 0),
        });
      }
      counts.sort((a, b) => b.n - a.n);
      return counts[0] ?? null;
    });
    expect(pick).not.toBeNull();
    if (pick!.n < 3) {
      await page.evaluate(async (vesselId) => {
        const fits = await (await fetch(`/api/vessels/${vesselId}/fits?limit=500`)).json();
        for (const f of fits.items) {
          if (f.status !== 'draft' || f.supersededBy !== null) continue;
          await fetch(`/api/fits/${f.id}/review`, {
            method: 'POST',
            headers: { 'content-type': 'application/json' },
            body: JSON.stringify({ decision: 'approve', comment: 'approved for the e2e trend' }),
          });
        }
      }, pick!.vesselId);
    }
    await page.goto(`${srv.base}/#/vessels/${pick!.vesselId}`);
    await page.getByRole('heading', { name: 'Trend of approved tests' }).waitFor();
    const chart = page.locator(`#trend-${pick!.outletId}`);
    await chart.locator('canvas').waitFor();
    expect(Number(await chart.getAttribute('data-points'))).toBeGreaterThanOrEqual(2);
    // when the next test is due (the site's or the outlet's interval)
    await expect(page.locator('.trend-schedule').first().textContent()).resolves.toMatch(
      /^Next test: (Never tested|Overdue since|Next test due) /,
    );
    // the status sentence, with the forecast crossing date (or why there is none)
    await expect(page.locator('.trend-status').first().textContent()).resolves.toMatch(
      /\d{4}-\d{2}-\d{2}|forecast/i,
    );
    const csv = page.getByRole('link', { name: 'History as CSV' }).first();
    const csvText = await page.evaluate(
      async (href) => (await fetch(href)).text(),
      (await csv.getAttribute('href'))!,
    );
    expect(csvText.split('\n').length).toBeGreaterThan(2);
    await page.locator('section.trend').screenshot({ path: join(shots, '13-vessel-trend.png') });

    // maintenance: record a cleaning today; the page is drawn again with a new epoch
    const epochs = Number(await chart.getAttribute('data-epochs'));
    await page.getByLabel('What was done').selectOption('cleaned');
    await page.getByLabel('Notes').fill('descaled, e2e');
    await page.getByRole('button', { name: 'Record maintenance' }).click();
    await page.waitForFunction(
      (n) =>
        Number(document.querySelector('.trend-chart')?.getAttribute('data-epochs') ?? 0) > n ||
        document.querySelector('.maintenance table')?.textContent?.includes('descaled, e2e'),
      epochs,
      { timeout: 30_000 },
    );
    await expect(page.locator('.maintenance table').textContent()).resolves.toContain(
      'descaled, e2e',
    );
    await shot('14-vessel-page');

    // the fleet's drift column, soonest threshold first
    await page.goto(`${srv.base}/#/`);
    await page.locator('table.fleet tbody tr').first().waitFor();
    await expect(page.locator('table.fleet thead').textContent()).resolves.toContain(
      'Drift status',
    );
    // tests that fall due: the next test's date per outlet, overdue ones marked
    await expect(page.locator('table.fleet thead').textContent()).resolves.toContain(
      'Next test due',
    );
    await expect(page.locator('table.fleet td.due').first().textContent()).resolves.toMatch(
      /\d{4}-\d{2}-\d{2}|due now/,
    );
  }, 180_000);

  it('auditor: the log filtered by vessel, user and date; the chain check; report links; export', async () => {
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
        'e2e-auditor-2',
      ],
      { cwd: root, env: srv.env, encoding: 'utf8' },
    );
    expect(made.status).toBe(0);
    await signIn(made.stdout.trim());
    await page.getByRole('link', { name: 'Audit log' }).click();
    await page.getByRole('heading', { level: 1, name: 'Audit log' }).waitFor();
    await page.locator('table.audit tbody tr').first().waitFor();
    const all = await page.locator('table.audit tbody tr').count();

    // chain check
    await page.getByRole('button', { name: 'Check the chain' }).click();
    await page.getByText('The chain is intact.').waitFor();

    // by vessel: only that vessel's trail, with fit report links
    const vesselOption = (await page
      .locator('form.audit-filters')
      .getByLabel('Vessel')
      .locator('option')
      .nth(1)
      .textContent())!;
    await page
      .locator('form.audit-filters')
      .getByLabel('Vessel')
      .selectOption({ label: vesselOption });
    await page.getByRole('button', { name: 'Show entries' }).click();
    await page.waitForFunction(() => document.querySelector('.outlet-reports a') !== null);
    const byVessel = await page.locator('table.audit tbody tr').count();
    expect(byVessel).toBeGreaterThan(0);
    expect(byVessel).toBeLessThanOrEqual(all);
    const ons = await page.locator('table.audit tbody td:nth-child(5)').allTextContents();
    expect(ons.every((t) => /^(vessel|outlet|test|fit|maintenance event) \d+$/.test(t))).toBe(true);
    const pdf = page.locator('table.audit a[href$="/report.pdf"]').first();
    if (await pdf.count()) {
      const status = await page.evaluate(
        async (href) => (await fetch(href)).status,
        (await pdf.getAttribute('href'))!,
      );
      expect(status).toBe(200);
    }
    await shot('15-audit-vessel');

    // by person and date: the demo loader today
    await page.locator('form.audit-filters').getByLabel('Vessel').selectOption('');
    const today = new Date().toISOString().slice(0, 10);
    await page.getByLabel('From (inclusive)').fill(today);
    await page.getByLabel('Until (inclusive)').fill(today);
    const people = await page.getByLabel('Person').locator('option').allTextContents();
    expect(people.length).toBeGreaterThanOrEqual(2);
    await page.getByLabel('Person').selectOption({ index: 1 });
    await page.getByRole('button', { name: 'Show entries' }).click();
    await page.waitForFunction(() =>
      /entr(y|ies) shown/.test(document.querySelector('.count')?.textContent ?? ''),
    );
    const who = new Set(await page.locator('table.audit tbody td:nth-child(3)').allTextContents());
    expect(who.size).toBeLessThanOrEqual(1);

    // export: the zip arrives
    await page.getByRole('button', { name: 'Make the export' }).click();
    await page
      .locator('#export-link')
      .or(page.locator('.export-form .notice-error'))
      // a hang guard, not a speed check: 64 PDFs take about a minute on a busy 2-core machine
      .waitFor({ timeout: 240_000 });
    await page
      .locator('section:has(.export-form)')
      .screenshot({ path: join(shots, '16-audit-export.png') });
    expect(await page.locator('#export-link').count()).toBe(1);

    expect(problems.filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
    expect(unexpected(problems)).toEqual([]);
  }, 420_000);
});
