/** Launching Debian's chromium for the e2e tests, and what to do when it is missing. */
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';

export const root = fileURLToPath(new URL('../../', import.meta.url));
export const CHROMIUM = process.env.EFFLUX_CHROMIUM ?? '/usr/bin/chromium';
export const haveBrowser = existsSync(CHROMIUM);
export const shots = join(root, 'test-output/screenshots');

/** In CI a missing browser fails the run; elsewhere the tests say loudly that they were skipped. */
export function guardBrowser(suite: string): void {
  if (haveBrowser) return;
  if (process.env.CI === 'true') {
    describe(`${suite} (CI)`, () => {
      it('needs a browser', () => {
        expect.fail(`no browser at ${CHROMIUM}: CI must install chromium (see .ci/run)`);
      });
    });
  } else {
    process.stderr.write(`\n*** e2e SKIPPED (${suite}): no browser at ${CHROMIUM}. Install Debian's chromium or set EFFLUX_CHROMIUM; in CI this fails. ***\n\n`);
  }
}

export async function launch(): Promise<{ context: BrowserContext; page: Page; profile: string; problems: string[] }> {
  const profile = mkdtempSync(join(tmpdir(), 'efflux-e2e-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    viewport: { width: 1280, height: 800 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(m.text());
  });
  page.on('pageerror', (e) => problems.push(String(e)));
  return { context, page, profile, problems };
}

/** Console errors that are not the expected answers of absent optional routes (404) or refused tokens (401). */
export const unexpected = (problems: string[]) => problems.filter((p) => !/Failed to load resource: the server responded with a status of (401|404)/.test(p));

export async function dragAcross(page: Page, selector: string, from: number, to: number): Promise<void> {
  await page.locator(selector).scrollIntoViewIfNeeded();
  const box = (await page.locator(selector).boundingBox())!;
  await page.mouse.move(box.x + box.width * from, box.y + box.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * to, box.y + box.height / 2, { steps: 12 });
  await page.mouse.up();
}
