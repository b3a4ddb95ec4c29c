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
    process.stderr.write(
      `\n*** e2e SKIPPED (${suite}): no browser at ${CHROMIUM}. Install Debian's chromium or set EFFLUX_CHROMIUM; in CI this fails. ***\n\n`,
    );
  }
}

export async function launch(): Promise<{
  context: BrowserContext;
  page: Page;
  profile: string;
  problems: string[];
}> {
  const profile = mkdtempSync(join(tmpdir(), 'efflux-e2e-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--disable-quic',
    ],
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
export const unexpected = (problems: string[]) =>
  problems.filter(
    (p) => !/Failed to load resource: the server responded with a status of (401|404)/.test(p),
  );

export async function dragAcross(
  page: Page,
  selector: string,
  from: number,
  to: number,
): Promise<void> {
  await page.locator(selector).scrollIntoViewIfNeeded();
  const box = (await page.locator(selector).boundingBox())!;
  await page.mouse.move(box.x + box.width * from, box.y + box.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * to, box.y + box.height / 2, { steps: 12 });
  await page.mouse.up();
}

export interface RunningServer {
  base: string;
  adminToken: string;
  env: NodeJS.ProcessEnv;
  stop(): Promise<void>;
}

/** `efflux serve` on a free port with its own data folder and a fresh web build; the demo scenario loads. */
export async function startServer(): Promise<RunningServer> {
  const { spawn } = await import('node:child_process');
  const { rmSync, readFileSync } = await import('node:fs');
  const { buildWeb } = await import('../../web/build.js');
  const dataDir = mkdtempSync(join(tmpdir(), 'efflux-e2e-data-'));
  const webRoot = mkdtempSync(join(tmpdir(), 'efflux-e2e-web-'));
  await buildWeb(webRoot);
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
  const server = spawn(
    process.execPath,
    ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'serve'],
    { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] },
  );
  let out = '';
  const base = await new Promise<string>((resolve, reject) => {
    server.stdout!.on('data', (d) => {
      out += d;
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
      if (m && /\/api\/docs\n/.test(out)) resolve(m[1]);
    });
    server.stderr!.on('data', (d) => (out += d));
    server.once('exit', (code) =>
      reject(new Error(`server exited ${code} before listening:\n${out}`)),
    );
  });
  const adminToken = readFileSync(join(dataDir, 'first-admin-token.txt'), 'utf8').trim(); // never in the output
  return {
    base,
    adminToken,
    env,
    async stop() {
      if (server.exitCode === null) {
        const exited = new Promise((r) => server.once('exit', r));
        process.kill(server.pid!, 'SIGTERM');
        await exited;
      }
      for (const d of [dataDir, webRoot]) rmSync(d, { recursive: true, force: true });
    },
  };
}
