/** `efflux serve` as a real process (from source, the small stand-in engine), and the CLI run asynchronously. */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve as resolvePath } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = fileURLToPath(new URL('../../', import.meta.url));
const main = join(root, 'server/cli/main.ts');

export function envFor(dataDir: string, extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return {
    ...process.env,
    EFFLUX_DATA_DIR: dataDir,
    PORT: '0',
    HOST: '127.0.0.1',
    EFFLUX_DEMO: '0',
    EFFLUX_LOG: 'silent',
    EFFLUX_WORKERS: '1',
    EFFLUX_ANALYZE_MODULE: new URL('../http/fake-analyze.ts', import.meta.url).href,
    NO_COLOR: '1',
    ...extra,
  };
}

export interface Served {
  child: ChildProcess;
  base: string;
  out: () => string;
  exited: Promise<number | null>;
  token: string | null;
}

export function serve(env: NodeJS.ProcessEnv, args: string[] = []): Promise<Served> {
  const child = spawn(process.execPath, ['--import', 'tsx', main, 'serve', ...args], {
    cwd: root,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  let out = '';
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
      if (m && /\/api\/docs\n/.test(out))
        resolve({ child, base: m[1], out: () => out, exited, token: firstToken(out, env, args) });
    });
    child.stderr!.on('data', (d) => (out += d));
    child.on('exit', (code) =>
      reject(new Error(`server exited ${code} before listening:\n${out}`)),
    );
  });
}

/** The first start's admin token: printed, or written to first-admin-token.txt in the data folder. */
function firstToken(out: string, env: NodeJS.ProcessEnv, args: string[]): string | null {
  const printed = /keep it safe:\n\s+(\S+)/.exec(out)?.[1];
  if (printed) return printed;
  const i = args.indexOf('--data');
  const dir = resolvePath(root, i >= 0 ? args[i + 1] : env.EFFLUX_DATA_DIR || 'data');
  const file = join(dir, 'first-admin-token.txt');
  return existsSync(file) ? readFileSync(file, 'utf8').trim() : null;
}

/** The CLI without blocking the event loop (a server in this process's tests keeps answering). */
export function eff(
  args: string[],
  env: NodeJS.ProcessEnv,
): Promise<{ code: number | null; stdout: string; stderr: string }> {
  const child = spawn(process.execPath, ['--import', 'tsx', main, ...args], {
    cwd: root,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let stdout = '';
  let stderr = '';
  child.stdout!.on('data', (d) => (stdout += d));
  child.stderr!.on('data', (d) => (stderr += d));
  return new Promise((resolve) => child.once('close', (code) => resolve({ code, stdout, stderr })));
}

export async function stop(s: Served): Promise<number | null> {
  if (s.child.exitCode !== null) return s.child.exitCode;
  s.child.kill('SIGTERM');
  return s.exited;
}
