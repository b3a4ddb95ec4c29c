/** Which program wrote a report: the engine version and the git commit (shell side, read once). */
import { execFileSync } from 'node:child_process';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { SoftwareRecord } from '../core/report/index.js';
import { ENGINE_VERSION } from '../core/version.js';

let cached: string | null = null;

/** EFFLUX_GIT_COMMIT (set by a packaged build), else `git rev-parse HEAD` beside this file, else "unknown". */
export function gitCommit(env = process.env): string {
  if (env.EFFLUX_GIT_COMMIT) return env.EFFLUX_GIT_COMMIT;
  if (cached !== null) return cached;
  try {
    cached =
      execFileSync('git', ['rev-parse', 'HEAD'], {
        cwd: dirname(fileURLToPath(import.meta.url)),
        encoding: 'utf8',
        stdio: ['ignore', 'pipe', 'ignore'],
      }).trim() || 'unknown';
  } catch {
    cached = 'unknown';
  }
  return cached;
}

export function currentSoftware(): SoftwareRecord {
  return { name: 'efflux', version: ENGINE_VERSION, gitCommit: gitCommit() };
}
