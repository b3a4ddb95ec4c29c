/** The service's settings, from the environment (documented in server/http/README.md). */
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseWebhookList } from '../jobs/alerts.js';

/** A folder at the project root, found from this file whether it runs from server/ or dist/server/. */
export function projectPath(name: string): string {
  for (const up of ['../../', '../../../']) {
    const p = fileURLToPath(new URL(up + name, import.meta.url));
    if (existsSync(p)) return p;
  }
  return fileURLToPath(new URL('../../' + name, import.meta.url));
}

export function dataDir(env = process.env): string {
  return resolve(env.EFFLUX_DATA_DIR ?? './data');
}

function intOr(v: string | undefined, dflt: number, name: string): number {
  if (v === undefined || v === '') return dflt;
  const n = Number(v);
  if (!Number.isInteger(n) || n < 0) throw new Error(`${name} must be a whole number, not "${v}"`);
  return n;
}

export function serveConfig(env = process.env) {
  return {
    dataDir: dataDir(env),
    host: env.HOST ?? '127.0.0.1',
    port: intOr(env.PORT, 8080, 'PORT'),
    demo: env.EFFLUX_DEMO !== '0',
    demoManifest: env.EFFLUX_DEMO_MANIFEST ?? projectPath('sample-data/manifest.json'),
    uploadLimitBytes: intOr(env.EFFLUX_UPLOAD_LIMIT_MB, 40, 'EFFLUX_UPLOAD_LIMIT_MB') * 1024 * 1024,
    requestTimeoutMs: intOr(env.EFFLUX_REQUEST_TIMEOUT_S, 120, 'EFFLUX_REQUEST_TIMEOUT_S') * 1000,
    analysisTimeoutMs: intOr(env.EFFLUX_ANALYSIS_TIMEOUT_S, 120, 'EFFLUX_ANALYSIS_TIMEOUT_S') * 1000,
    /** Least seconds between two refits of a live test. */
    liveRefitMs: intOr(env.EFFLUX_LIVE_REFIT_S, 3, 'EFFLUX_LIVE_REFIT_S') * 1000,
    workers: env.EFFLUX_WORKERS ? intOr(env.EFFLUX_WORKERS, 1, 'EFFLUX_WORKERS') : undefined,
    /** Time limit of reports, exports' PDFs, large reads and joint fits (jobs/tasks.ts); default per kind. */
    taskTimeoutMs: env.EFFLUX_TASK_TIMEOUT_S ? intOr(env.EFFLUX_TASK_TIMEOUT_S, 60, 'EFFLUX_TASK_TIMEOUT_S') * 1000 : undefined,
    taskThreads: env.EFFLUX_TASK_THREADS ? intOr(env.EFFLUX_TASK_THREADS, 1, 'EFFLUX_TASK_THREADS') : undefined,
    /** For tests and benchmarks only: a module exporting analyzeDrainTest instead of the engine. */
    analyzeModule: env.EFFLUX_ANALYZE_MODULE,
    webRoot: env.EFFLUX_WEB_ROOT ?? projectPath('dist/web'),
    secureCookie: env.EFFLUX_SECURE_COOKIE === '1',
    log: env.EFFLUX_LOG ?? 'info',
    /** Addresses told of outlet status changes (comma-separated http(s) URLs). */
    webhooks: parseWebhookList(env.EFFLUX_WEBHOOKS),
    /** Origins besides the request's own accepted for cookie-authenticated writes (e.g. the public https address behind a proxy). */
    allowedOrigins: (env.EFFLUX_ORIGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean),
  };
}
