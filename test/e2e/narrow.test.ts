/**
 * The workbench at 800 px (a tablet held upright, a narrow window) and at 1280 px, in a real
 * browser against `efflux serve` with the demo data (invented, fictional Kestrel Fen): on the fleet,
 * a vessel, a fit and the connected-vessels pages nothing is wider than the viewport — the page does
 * not scroll sideways and no element's box reaches past the right edge. Also: the main menu does not
 * show before sign-in; the fit page names its people and shows the passing inlet's flow in L/s.
 * Screenshots: test-output/screenshots/20-… (look at them).
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
guardBrowser('narrow pages');

/** Elements whose box reaches past the viewport's right edge (or the page is wider than it). */
async function overflow(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    const vw = window.innerWidth;
    const doc = document.documentElement;
    if (doc.scrollWidth > vw) out.push(`document ${doc.scrollWidth} px wide in ${vw} px`);
    for (const el of Array.from(document.body.querySelectorAll('*'))) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 && r.height === 0) continue;
      const style = getComputedStyle(el);
      if (style.visibility === 'hidden' || style.display === 'none') continue;
      // no exception for boxes that scroll sideways: a table cut off at the edge is what this catches
      if (r.right > vw + 0.5) {
        const id = el.id ? `#${el.id}` : '';
        const cls =
          typeof el.className === 'string' && el.className ? `.${el.className.split(' ')[0]}` : '';
        out.push(
          `${el.tagName.toLowerCase()}${id}${cls} ${Math.round(r.left)}–${Math.round(r.right)} px`,
        );
      }
    }
    return out.slice(0, 20);
  });
}

describe.skipIf(!haveBrowser)('pages at 800 px and 1280 px', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let problems: string[] = [];
  const where: Record<string, string> = {};

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true });
    srv = await startServer();
    ({ context, page, profile, problems } = await launch());
    // the pages to visit: a vessel with a fitted inflow (FB-1's leaking-inlet test) and its fit
    const auth = { authorization: `Bearer ${srv.adminToken}` };
    const get = async (url: string) => (await fetch(`${srv.base}${url}`, { headers: auth })).json();
    const vessels = (await get('/api/vessels?limit=100')).items as { id: number; name: string }[];
    const fb1 = vessels.find((v) => v.name === 'Backwash tank FB-1')!;
    const fits = (await get(`/api/vessels/${fb1.id}/fits`)).items as {
      id: number;
      settings: { fitInflow?: boolean };
    }[];
    where.vessel = `#/vessels/${fb1.id}`;
    where.fit = `#/fits/${fits.find((f) => f.settings.fitInflow)!.id}`;
  }, 240_000);

  afterAll(async () => {
    await context?.close();
    await srv?.stop();
    if (profile) spawnSync('rm', ['-rf', profile]);
  });

  it('before sign-in the main menu is not shown, not even for a moment', async () => {
    await page.setViewportSize({ width: 800, height: 1000 });
    // hold the session check back: until it answers nobody is known to be signed in
    let release = () => {};
    const held = new Promise<void>((r) => (release = r));
    await page.route('**/api/session', async (route) => {
      await held;
      await route.continue();
    });
    await page.goto(`${srv.base}/`, { waitUntil: 'domcontentloaded' });
    await page.waitForTimeout(300);
    expect(await page.locator('header.bar nav').isVisible()).toBe(false);
    release();
    await page.getByLabel('Access token').waitFor();
    await page.unroute('**/api/session');
    expect(await page.locator('header.bar nav').isVisible()).toBe(false);
    await page.getByLabel('Access token').fill(srv.adminToken);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
    expect(await page.locator('header.bar nav').isVisible()).toBe(true);
  }, 60_000);

  for (const width of [800, 1280])
    it(`nothing wider than the viewport at ${width} px: fleet, vessel, fit, connected vessels`, async () => {
      await page.setViewportSize({ width, height: 1000 });
      const pages: [string, string, () => Promise<unknown>][] = [
        ['fleet', '#/', () => page.locator('table.fleet tbody tr').nth(10).waitFor()],
        ['vessel', where.vessel, () => page.locator('main table tbody tr').first().waitFor()],
        ['fit', where.fit, () => page.locator('#fit-chart .uplot').waitFor()],
        [
          'systems',
          '#/systems',
          async () => {
            // with a joint fit on the page: schematic, per-log charts, tables (sample-data/systems)
            await page.getByRole('heading', { level: 1, name: 'Connected vessels' }).waitFor();
            await page
              .getByLabel('System file')
              .setInputFiles(join(SYSTEMS, 'filter-chain.system.json'));
            await page.locator('svg.system-schematic').waitFor();
            await page
              .getByLabel('Level log of Feed tank FT-1 (FT1)')
              .setInputFiles(join(SYSTEMS, 'ft1-2026-04-07.csv'));
            await page
              .getByLabel('Level log of Break tank BT-2 (BT2)')
              .setInputFiles(join(SYSTEMS, 'bt2-2026-04-07.csv'));
            await page.getByRole('button', { name: 'Fit all outlets together' }).click();
            await page.getByRole('heading', { name: 'Joint fit' }).waitFor({ timeout: 60_000 });
            await page.locator('#system-fit-BT2 canvas').waitFor();
          },
        ],
      ];
      for (const [name, hash, ready] of pages) {
        await page.goto(`${srv.base}/${hash}`);
        await ready();
        await page.waitForTimeout(300); // charts follow their container's width
        await page.screenshot({ path: join(shots, `20-${name}-${width}.png`), fullPage: true });
        // and in parts a person (or an image viewer) can read at full size
        const tall = await page.evaluate(() => document.documentElement.scrollHeight);
        for (let i = 0; i * 1000 < Math.min(tall, 5000); i++)
          await page.screenshot({
            path: join(shots, `20-${name}-${width}-part${i + 1}.png`),
            fullPage: true,
            clip: { x: 0, y: i * 1000, width, height: Math.min(1000, tall - i * 1000) },
          });
        expect(await overflow(page), `${name} at ${width} px`).toEqual([]);
      }
      // the check itself: a box made wider than the viewport is found
      await page.evaluate(() => {
        const probe = document.createElement('div');
        probe.id = 'probe';
        probe.style.width = `${window.innerWidth + 200}px`;
        probe.textContent = 'probe';
        document.querySelector('main')!.append(probe);
      });
      expect((await overflow(page)).some((o) => o.startsWith('div#probe'))).toBe(true);
      expect(unexpected(problems)).toEqual([]);
    }, 120_000);

  it('the fit page: test date, people by name, the passing inlet in L/s, no wrapped dates', async () => {
    await page.setViewportSize({ width: 800, height: 1000 });
    await page.goto(`${srv.base}/${where.fit}`);
    await page.locator('#fit-chart .uplot').waitFor();
    const facts = page.locator('#fit-facts');
    await facts.getByText('Uploaded by').waitFor();
    const text = (await facts.innerText()).replace(/\s+/g, ' ');
    expect(text).toMatch(/Tested 2026-03-26/);
    expect(text).toMatch(/Operator T\. Ashdown \(fictional\)/); // from the demo manifest
    expect(text).toMatch(/Uploaded by demo-loader|Uploaded by the system/);
    const inflow = page.locator('.headline .card', { hasText: 'Inflow during the drain' });
    expect(await inflow.innerText()).toMatch(/\d\.\d+ ± \d\.\d+ L\/s/);
    // every date on the page sits on one line
    const wrapped = await page.evaluate(
      () =>
        Array.from(document.querySelectorAll('time')).filter(
          (t) => t.getClientRects().length > 1 || t.getBoundingClientRect().height > 30,
        ).length,
    );
    expect(wrapped).toBe(0);
  }, 60_000);
});
