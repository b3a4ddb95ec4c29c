import { spawnSync } from 'node:child_process';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

/** Runs the CLI from source (through tsx), as `efflux …` would, and captures everything. */
export function efflux(args: string[], opts: { cwd?: string; env?: Record<string, string> } = {}) {
  const r = spawnSync(
    process.execPath,
    ['--import', 'tsx', resolve(root, 'server/cli/main.ts'), ...args],
    {
      cwd: opts.cwd ?? root,
      encoding: 'utf8',
      env: { ...process.env, NO_COLOR: '1', ...opts.env },
      maxBuffer: 64 * 1024 * 1024,
    },
  );
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The CLI against a data folder (EFFLUX_DATA_DIR), with a fixed git commit so reports rebuild the same. */
export function effluxWithData(dataDir: string, args: string[]) {
  return efflux(args, { env: { EFFLUX_DATA_DIR: dataDir, EFFLUX_GIT_COMMIT: 'test-commit' } });
}
