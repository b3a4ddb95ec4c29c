/**
 * Issue 19 in a real browser: two demo tests of FB-1 side by side show their E_n, equal to the value
 * worked by hand from the two fits' Cd·a and U read from the API; the raw logger file downloads from
 * the fit page and from the test list byte for byte; the audit page lists newest first and filters
 * by kind of action in plain words. Demo data: the invented Kestrel Fen backwash tank FB-1.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
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

guardBrowser('tests side by side and auditor aids');

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

describe.skipIf(!haveBrowser)('FB-1 side by side, raw files, audit log', () => {
  let srv: RunningServer;
  let context: BrowserContext;
  let page: Page;
  let problems: string[] = [];
  let profile = '';
  let vessel: { id: number; outlets: { id: number; key: string }[] };
  let tests: { id: number; fileName: string }[] = [];

  const api = async (path: string) => {
    const res = await fetch(`${srv.base}${path}`, {
      headers: { authorization: `Bearer ${srv.adminToken}` },
    });
    expect(res.status, path).toBe(200);
    return (await res.json()) as any;
  };

  beforeAll(async () => {
    srv = await startServer();
    ({ context, page, profile, problems } = await launch());
    const vessels = await api('/api/vessels?limit=500');
    vessel = vessels.items.find((v: { name: string }) => /FB-1/.test(v.name));
    tests = (await api(`/api/vessels/${vessel.id}/tests?limit=500`)).items;
    await page.goto(`${srv.base}/`);
    await page.getByLabel('Access token').fill(srv.adminToken);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Fleet' }).waitFor();
  }, 240_000);

  afterAll(async () => {
    await context?.close();
    await srv?.stop();
    if (profile) spawnSync('rm', ['-rf', profile]);
  });

  it('shows the two tests E_n, equal to the hand-worked value from the two fits', async () => {
    expect(tests.length).toBe(2); // the demo's two FB-1 tests (2026-03-10 and 2026-03-26)
    const outlet = vessel.outlets[0];
    await page.goto(`${srv.base}/#/vessels/${vessel.id}`);
    await page.getByRole('link', { name: `Compare tests of ${outlet.key} side by side` }).click();
    const pairs = page.locator('table.comparison-pairs');
    await pairs.waitFor();
    await page.locator('#comparison-chart canvas').first().waitFor();
    // the fit each test stands for, read from the API, and E_n worked out here:
    // E_n = (x₁ − x₂) / √(U₁² + U₂²), x Cd·a, U its expanded uncertainty (ISO/IEC 17043 Annex B)
    const shown = await page.locator('table.comparison-results tbody tr').allTextContents();
    expect(shown).toHaveLength(2);
    const fitIds = shown.map((row) => Number(/fit (\d+)/.exec(row)![1]));
    const [a, b] = await Promise.all(
      fitIds.map(async (id) => (await api(`/api/fits/${id}`)).result.effectiveAreaM2),
    );
    const en =
      (a.value - b.value) / Math.sqrt(a.expandedUncertainty ** 2 + b.expandedUncertainty ** 2);
    const cells = await pairs.locator('tbody tr').first().locator('td').allTextContents();
    // columns: pair, Δ Cd·a ± U, E_n of Cd·a, words, Δ Cd ± U, E_n of Cd, words
    expect(cells[2]).toBe(en.toFixed(2).replace('-', '−'));
    expect(cells[3]).toBe(Math.abs(en) <= 1 ? 'agrees (|En| ≤ 1)' : 'differs (|En| > 1)');
    expect(Number.isFinite(en)).toBe(true);
    await page.screenshot({ path: join(shots, 'compare-fb1.png'), fullPage: true });
    expect(unexpected(problems)).toEqual([]);
  }, 120_000);

  it('downloads the raw logger file from the test list and from the fit page, byte for byte', async () => {
    const test = tests.find((x) => x.fileName === 'fb1-2026-03-10-preamble.csv')!;
    const upload = readFileSync(join(root, 'sample-data', test.fileName));
    await page.goto(`${srv.base}/#/vessels/${vessel.id}`);
    const fromList = page.waitForEvent('download');
    await page.locator('a.raw-download', { hasText: test.fileName }).click();
    const d1 = await fromList;
    expect(d1.suggestedFilename()).toBe(test.fileName);
    expect(sha(readFileSync((await d1.path())!))).toBe(sha(upload));

    const fits = (await api(`/api/tests/${test.id}/fits`)).items;
    await page.goto(`${srv.base}/#/fits/${fits[0].id}`);
    const fromFit = page.waitForEvent('download');
    await page.locator('#raw-log').click();
    const d2 = await fromFit;
    expect(d2.suggestedFilename()).toBe(test.fileName);
    expect(sha(readFileSync((await d2.path())!))).toBe(sha(upload));
  }, 120_000);

  it('lists the audit log newest first, filters by kind of action, in plain words', async () => {
    await page.goto(`${srv.base}/#/audit`);
    const rows = page.locator('table.audit tbody tr');
    await rows.first().waitFor();
    const seqs = (await rows.evaluateAll((trs) => trs.map((tr) => Number(tr.dataset.seq)))).slice(
      0,
      20,
    );
    expect(seqs.length).toBeGreaterThan(2);
    expect(seqs).toEqual([...seqs].sort((x, y) => y - x));
    await page.getByLabel('What happened').selectOption({ label: 'Drain test uploaded' });
    await page.getByRole('button', { name: 'Show entries' }).click();
    await page.locator('p.count', { hasText: 'newest first' }).waitFor();
    await expect
      .poll(async () => new Set(await rows.locator('td:nth-child(4)').allTextContents()))
      .toEqual(new Set(['Drain test uploaded']));
    expect(await rows.count()).toBeGreaterThan(10); // the demo's uploads
  }, 120_000);
});
