/**
 * One demo fit, three readers: the CLI's text report, the fit page in a real browser and the fit
 * PDF (pdftotext) show Cd·a, Cd and their expanded uncertainties with the same digits (issue 19,
 * "Done when"); then the person's US customary preference, chosen in the signed-in menu, turns the
 * page and their PDF to in², gal/min and ft, as `--units us` does the CLI. Demo data: the invented
 * Kestrel Fen backwash tank FB-1, test of 2026-03-10 (sample-data/, fictional).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  guardBrowser,
  haveBrowser,
  launch,
  root,
  startServer,
  type RunningServer,
} from './browser.js';

guardBrowser('units: CLI, fit page and PDF agree');

const LOG = 'fb1-2026-03-10-preamble.csv';

function cli(args: string[]): string {
  const r = spawnSync(
    process.execPath,
    ['--import', 'tsx', join(root, 'server/cli/main.ts'), ...args],
    { cwd: root, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } },
  );
  expect(r.status, r.stderr).toBe(0);
  return r.stdout;
}

/** "value ± U" pairs after a label, as printed: the strings compared across the three readers. */
const cdOf = (text: string) => /Cd\b[^±\d]*?(\d+\.\d+ ± \d+\.\d+)/.exec(text)?.[1];
const areaOf = (text: string, unit: string) =>
  new RegExp(`(\\d+(?:\\.\\d+)? ± \\d+(?:\\.\\d+)?) ${unit}`).exec(text)?.[1];

describe.skipIf(!haveBrowser)('the same digits in the CLI, the fit page and the PDF', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let fitId = 0;
  const tmp = mkdtempSync(join(tmpdir(), 'efflux-units-'));

  /** The API as the admin token; a pooled connection the server has just closed is tried once more. */
  const api = async (path: string, init: RequestInit = {}): Promise<Response> => {
    const go = () =>
      fetch(`${srv.base}${path}`, {
        ...init,
        headers: { authorization: `Bearer ${srv.adminToken}`, ...(init.headers ?? {}) },
      });
    try {
      return await go();
    } catch {
      return go();
    }
  };

  /** The fit PDF as the signed-in person fetches it from the page (their cookie, their units). */
  async function pdfText(query = ''): Promise<string> {
    const bytes = await page.evaluate(
      async ([id, q]) => {
        const r = await fetch(`/api/fits/${id}/report.pdf${q}`);
        if (r.status !== 200) throw new Error(`report.pdf answered ${r.status}`);
        return Array.from(new Uint8Array(await r.arrayBuffer()));
      },
      [fitId, query] as const,
    );
    const file = join(tmp, `fit-${Date.now()}.pdf`);
    writeFileSync(file, Buffer.from(bytes));
    const r = spawnSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    return r.stdout;
  }

  async function pageText(): Promise<string> {
    await page.goto(`${srv.base}/#/fits/${fitId}`);
    const headline = page.locator('section.headline');
    await headline.waitFor();
    await page
      .getByRole('heading', { name: /Parameters/ })
      .first()
      .waitFor();
    return (await page.locator('#view').textContent())!;
  }

  beforeAll(async () => {
    srv = await startServer();
    ({ context, page, profile } = await launch());
    const vessels = (await (await api('/api/vessels?limit=500')).json()) as any;
    const fb1 = (vessels.items ?? vessels).find((v: any) => /FB-1/.test(v.name));
    const tests = (await (await api(`/api/vessels/${fb1.id}/tests?limit=500`)).json()) as any;
    const test = (tests.items ?? tests).find((t: any) => t.fileName === LOG);
    const fits = (await (await api(`/api/tests/${test.id}/fits`)).json()) as any;
    fitId = (fits.items ?? fits)[0].id;
    await page.goto(`${srv.base}/`);
    await page.getByLabel('Access token').fill(srv.adminToken);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
  }, 240_000);

  afterAll(async () => {
    await context?.close();
    await srv?.stop();
    if (profile) spawnSync('rm', ['-rf', profile]);
    rmSync(tmp, { recursive: true, force: true });
  });

  it('SI: Cd·a in mm² and Cd, each ± U, identical in the three', async () => {
    const text = cli([
      'fit',
      `sample-data/${LOG}`,
      '--vessel',
      'sample-data/backwash-tank-fb1.vessel.json',
    ]);
    const web = await pageText();
    const pdf = await pdfText();
    const cd = cdOf(text.split('\n').find((l) => l.startsWith('Discharge coefficient'))!);
    const area = areaOf(text, 'mm²');
    expect(cd).toMatch(/^0\.61\d\d ± 0\.00\d\d$/);
    expect(area).toMatch(/^\d{4}\.\d+ ± \d/);
    for (const [name, other] of [
      ['fit page', web],
      ['PDF', pdf],
    ] as const) {
      expect(other, `${name}: Cd ${cd}`).toContain(cd!);
      expect(other, `${name}: Cd·a ${area} mm²`).toContain(`${area} mm²`);
    }
    expect(pdf).toMatch(/units\s+SI \(mm², L\/s, m\)/);
  }, 120_000);

  it('US customary: the menu choice turns the page and the PDF to in², gal/min and ft, as --units us does the CLI', async () => {
    const text = cli([
      'fit',
      `sample-data/${LOG}`,
      '--vessel',
      'sample-data/backwash-tank-fb1.vessel.json',
      '--units',
      'us',
    ]);
    const area = areaOf(text, 'in²');
    expect(area).toMatch(/^1\.\d+ ± 0\.\d+$/); // 1.2 × 10⁻³ m² / 6.4516 × 10⁻⁴ = 1.86 in²
    expect(text).toContain('gal/min'); // the inflow parameter's unit
    expect(text).toMatch(/ ft\b/); // head bands

    await page.locator('#display-units').selectOption('us');
    await expect
      .poll(async () => ((await (await api('/api/session')).json()) as any).user.displayUnits, {
        timeout: 10_000,
      })
      .toBe('us');
    const web = await pageText();
    expect(web).toContain(`${area} in²`);
    expect(web).toContain('gal/min');
    expect(web).toMatch(/\d\.\d+ ft/); // head bands (cells run together in textContent)
    expect(await page.locator('section.headline').textContent()).not.toContain('mm²');
    // the PDF follows the asker's preference: the signed-in person (cookie) through the page
    const pdf = await pdfText();
    expect(pdf).toContain(`${area} in²`);
    expect(pdf).toContain('gal/min');
    expect(pdf).toMatch(/units\s+US customary/);
    // ?units= overrides the preference
    expect(await pdfText('?units=si')).toContain('mm²');
    // back to SI for whoever runs next
    await page.locator('#display-units').selectOption('si');
  }, 120_000);
});
