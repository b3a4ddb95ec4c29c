/**
 * A newcomer at a US site adds a vessel through the workbench alone, in feet and inches: a lying
 * (horizontal) cylinder 6 ft across and 14 ft 9 in long with a 1 in short-tube outlet, checked as
 * typed; uploads the demo day-tank log (level in feet, US dates; sample-data/d2-2026-03-20-12h-ft.csv),
 * fits, and a second person approves. The same vessel entered as a vessel file in metres (each
 * length the exact SI value, 1 in = 0.0254 m and 1 ft = 0.3048 m, NIST SP 811 B.8) gives the same
 * stored file, the same fit to the digits shown and the same drawing. Invented people and vessels.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { vesselFileProblems } from '../../server/core/vessel/service-file.js';
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

const LOG = join(root, 'sample-data/d2-2026-03-20-12h-ft.csv');
const SITE = 'Kestrel Fen works (fictional)';
// 6 ft = 72 in = 1.8288 m; 14 ft 9 in = 177 in = 4.4958 m; 1 in = 0.0254 m; 0.1 mm = 0.0001 m
const AS_FILE = {
  name: 'Day tank D-9 (entered as a file)',
  site: SITE,
  tag: 'D-9F',
  shape: { kind: 'horizontal-cylinder', diameterM: 1.8288, lengthM: 4.4958 },
  outlet: {
    id: 'bottom',
    type: 'square-edged-short-tube',
    boreM: 0.0254,
    boreToleranceM: 0.0001,
    elevationM: 0,
  },
  sensor: { zeroElevationM: 0 },
};

guardBrowser('vessel form');

describe.skipIf(!haveBrowser)('a vessel entered in feet and inches through the workbench', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let profile = '';
  let problems: string[] = [];
  const tokens: Record<string, string> = {};

  const call = async (method: string, url: string, body?: unknown, token = srv.adminToken) => {
    const r = await fetch(`${srv.base}${url}`, {
      method,
      headers: {
        authorization: `Bearer ${token}`,
        ...(body instanceof FormData || body === undefined
          ? {}
          : { 'content-type': 'application/json' }),
      },
      body: body instanceof FormData ? body : body === undefined ? undefined : JSON.stringify(body),
    });
    return { status: r.status, json: (await r.json()) as any };
  };

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true });
    srv = await startServer();
    for (const name of ['Newcomer (fictional)', 'Reviewer (fictional)']) {
      const p = await call('POST', '/api/people', { name, role: 'engineer' });
      expect(p.status).toBe(201);
      const t = await call('POST', `/api/people/${p.json.id}/tokens`, { label: 'e2e' });
      tokens[name] = t.json.token;
    }
    ({ context, page, profile, problems } = await launch());
  }, 240_000);

  afterAll(async () => {
    await context?.close();
    await srv?.stop();
    if (profile) rmSync(profile, { recursive: true, force: true });
  });

  const shot = (name: string) =>
    page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });

  async function signIn(token: string) {
    await page.goto(`${srv.base}/`);
    const out = page.getByRole('button', { name: 'Sign out' });
    if (await out.isVisible()) {
      await out.click();
    }
    await page.getByLabel('Access token').waitFor();
    await page.getByLabel('Access token').fill(token);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
  }

  const length = (path: string) => page.locator(`input[name="${path}"]`);
  const errorOf = (path: string) => page.locator(`[data-error-for="${path}"]`);

  it('creates, fits and approves it; the fit and the drawing agree with the same vessel as a file', async () => {
    await signIn(tokens['Newcomer (fictional)']);
    await page.getByRole('link', { name: 'New vessel' }).click();
    await page.getByRole('heading', { level: 1, name: 'New vessel' }).waitFor();

    await page.locator('input[name="site"]').fill(SITE);
    await page.locator('input[name="name"]').fill('Day tank D-9 (newcomer)');
    await page.locator('input[name="tag"]').fill('D-9');
    await page.locator('select[name="default-unit"]').selectOption('ft-in');
    await page.locator('select[name="shape.kind"]').selectOption('horizontal-cylinder');
    // the kind's own fields, and no others
    await length('shape.lengthM').waitFor();
    expect(
      await page
        .locator('input[name^="shape."]')
        .evaluateAll((els) => els.map((e) => e.getAttribute('name'))),
    ).toEqual([
      'shape.diameterM',
      'shape.lengthM',
      'shape.diameterToleranceM',
      'shape.lengthToleranceM',
    ]);
    await length('shape.diameterM').fill('6 ft');
    await length('shape.lengthM').fill('14\' 9"');
    await page.locator('input[name="outlet.id"]').fill('bottom');
    await page.locator('select[name="outlet.type"]').selectOption('square-edged-short-tube');

    // checked as typed, with the vessel file's own rule and message
    await length('outlet.boreM').fill('-1 in');
    const fileMessage = vesselFileProblems({
      ...AS_FILE,
      outlet: { ...AS_FILE.outlet, boreM: -0.0254 },
    })[0];
    expect(fileMessage.field).toBe('outlet.boreM');
    await expect(errorOf('outlet.boreM').textContent()).resolves.toBe(fileMessage.message);
    await expect(page.getByRole('button', { name: 'Save vessel' }).isDisabled()).resolves.toBe(
      true,
    );
    await length('outlet.boreM').fill('1 in');
    await expect(errorOf('outlet.boreM').textContent()).resolves.toBe('');
    // one field in millimetres: the unit beside it is the person's choice
    await page.locator('select[name="unit:outlet.boreToleranceM"]').selectOption('mm');
    await length('outlet.boreToleranceM').fill('0.1');
    await length('outlet.elevationM').fill('0');
    await length('sensor.zeroElevationM').fill('0');
    await expect(page.getByRole('button', { name: 'Save vessel' }).isEnabled()).resolves.toBe(true);
    const formDrawing = await page.locator('figure.drawing svg').evaluate((e) => e.outerHTML);
    await shot('20-vessel-form-ft-in');

    await page.getByRole('button', { name: 'Save vessel' }).click();
    await page.waitForURL(/#\/vessels\/\d+$/);
    const vesselId = Number(/#\/vessels\/(\d+)$/.exec(page.url())![1]);
    await page.getByRole('heading', { level: 1, name: 'Day tank D-9 (newcomer)' }).waitFor();
    const stored = (await call('GET', `/api/vessels/${vesselId}`)).json;
    expect(stored.spec).toEqual({ ...AS_FILE, name: 'Day tank D-9 (newcomer)', tag: 'D-9' });
    await page.getByRole('heading', { name: 'Revisions of the vessel file' }).waitFor();

    // export from the page gives the stored file; import fills the form from a file
    await page.goto(`${srv.base}/#/vessels/${vesselId}/edit`);
    await page.getByRole('heading', { level: 1, name: 'Edit Day tank D-9 (newcomer)' }).waitFor();
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('button', { name: 'Download vessel file' }).click(),
    ]);
    expect(download.suggestedFilename()).toBe('D-9.vessel.json');
    expect(JSON.parse(await readFile((await download.path())!, 'utf8'))).toEqual(stored.spec);
    const fileOnDisk = join(mkdtempSync(join(tmpdir(), 'efflux-e2e-vessel-')), 'd9.vessel.json');
    writeFileSync(fileOnDisk, JSON.stringify(AS_FILE));
    await page.locator('input[name="import"]').setInputFiles(fileOnDisk);
    await page.getByText('Read d9.vessel.json').waitFor();
    await expect(page.locator('input[name="name"]').inputValue()).resolves.toBe(AS_FILE.name);
    await expect(length('shape.lengthM').inputValue()).resolves.toBe('4.4958');

    // the same vessel as a file, in metres, through the API
    const fileVessel = await call('POST', '/api/vessels', AS_FILE);
    expect(fileVessel.status).toBe(201);
    await page.goto(`${srv.base}/#/vessels/${vesselId}`);
    await page.getByRole('heading', { level: 1, name: 'Day tank D-9 (newcomer)' }).waitFor();
    const pageDrawing = await page.locator('svg.vessel-drawing').evaluate((e) => e.outerHTML);
    await page.goto(`${srv.base}/#/vessels/${fileVessel.json.id}`);
    await page.getByRole('heading', { level: 1, name: AS_FILE.name }).waitFor();
    const fileDrawing = await page.locator('svg.vessel-drawing').evaluate((e) => e.outerHTML);
    expect(pageDrawing).toBe(fileDrawing);
    expect(formDrawing).toBe(fileDrawing);

    // the newcomer uploads the demo day-tank log and fits
    await page.goto(`${srv.base}/#/vessels/${vesselId}`);
    await page.getByRole('link', { name: 'New drain test' }).click();
    await page.getByLabel('Logger file').setInputFiles(LOG);
    await page.getByRole('button', { name: 'Fit this test' }).click();
    await page.waitForURL(/#\/fits\/\d+$/, { timeout: 180_000 });
    const fitId = Number(/#\/fits\/(\d+)$/.exec(page.url())![1]);
    await page.locator('.headline').waitFor();
    const formHeadline = await page.locator('.headline').textContent();
    await shot('21-vessel-form-fit');

    // a second person approves
    await signIn(tokens['Reviewer (fictional)']);
    await page.goto(`${srv.base}/#/fits/${fitId}`);
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.locator('.title-row .badge-approved').waitFor();
    await shot('22-vessel-form-approved');

    // the same log on the file's vessel: the same numbers to every digit shown
    const form = new FormData();
    form.append('log', new Blob([await readFile(LOG)]), 'd2.csv');
    const up = await call('POST', `/api/vessels/${fileVessel.json.id}/tests`, form);
    expect(up.status).toBe(201);
    await page.goto(`${srv.base}/#/fits/${up.json.fit.id}`);
    await page.locator('.headline').waitFor();
    expect(await page.locator('.headline').textContent()).toBe(formHeadline);
    const a = (await call('GET', `/api/fits/${fitId}`)).json.result;
    const b = up.json.fit.result;
    expect(a.dischargeCoefficient.value).toBe(b.dischargeCoefficient.value);
    expect(a.effectiveAreaM2.value).toBe(b.effectiveAreaM2.value);
    expect((await call('GET', `/api/fits/${fitId}/vessel-revision`)).json.revision).toBe(1);

    expect(problems.filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
    expect(unexpected(problems)).toEqual([]);
  }, 400_000);
});
