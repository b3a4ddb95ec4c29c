/**
 * `efflux serve`: open (create, migrate) the database, load the demo scenario into an empty one,
 * print a one-time admin token on first start, listen, and stop gracefully on SIGINT/SIGTERM:
 * in-flight requests finish (every write is one SQLite transaction, so nothing is half-written).
 */
import closeWithGrace from 'close-with-grace';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildApp } from '../http/app.js';
import { resumePending } from '../jobs/ingest.js';
import { createAnalysisPool } from '../jobs/pool.js';
import { loadDemo } from '../jobs/demo.js';
import { openStore, SYSTEM_ACTOR } from '../store/index.js';
import { serveConfig } from './serve-config.js';

const say = (line: string) => process.stdout.write(`${line}\n`);

export async function run(argv: string[]): Promise<number> {
  if (argv.includes('--help')) {
    say('usage: efflux serve   (settings from the environment: EFFLUX_DATA_DIR, HOST, PORT, EFFLUX_DEMO=0, ...; see server/http/README.md)');
    return 0;
  }
  const cfg = serveConfig();
  const store = openStore({ dataDir: cfg.dataDir });
  const pool = createAnalysisPool({ threads: cfg.workers, timeoutMs: cfg.analysisTimeoutMs, analyzeModule: cfg.analyzeModule });

  // The first admin token goes to a file only its owner can read, never to the output (logs are
  // collected and kept by process managers); the person reads it, keeps it, deletes the file.
  let firstTokenFile: string | null = null;
  if (store.users.count() === 0) {
    const { token } = store.users.createToken(SYSTEM_ACTOR, 'admin', 'admin', 'first-start');
    firstTokenFile = join(cfg.dataDir, 'first-admin-token.txt');
    writeFileSync(firstTokenFile, `${token}\n`, { mode: 0o600, flag: 'w' });
  }
  const undated = store.tests.undated();
  if (undated.length) say(`note: ${undated.length} old test(s) have no date (no date stated, elapsed-time log) and stay out of the trend: ${undated.map((u) => u.testId).join(', ')} (efflux audit verify lists why)`);

  const resumed = await resumePending(store, pool.run, SYSTEM_ACTOR).catch((e: Error) => ({ error: e.message }));
  if ('error' in resumed) say(`note: tests left pending by an earlier run could not be analysed yet (${resumed.error})`);
  else if (resumed.done + resumed.refused > 0) say(`analysed ${resumed.done} test(s) left pending by an earlier run; ${resumed.refused} refused and withdrawn`);

  if (cfg.demo && store.vessels.count() === 0 && store.tests.count() === 0) {
    const r = await loadDemo(store, pool.run, cfg.demoManifest);
    say(r.note);
    for (const s of r.skipped) say(`  skipped ${s}`);
  }

  const app = await buildApp({
    store,
    analyze: pool.run,
    uploadLimitBytes: cfg.uploadLimitBytes,
    requestTimeoutMs: cfg.requestTimeoutMs,
    secureCookie: cfg.secureCookie,
    webRoot: cfg.webRoot,
    webhooks: cfg.webhooks,
    liveRefitMs: cfg.liveRefitMs,
    allowedOrigins: cfg.allowedOrigins,
    taskTimeoutMs: cfg.taskTimeoutMs,
    taskThreads: cfg.taskThreads,
    logger: cfg.log === 'silent' ? false : { level: cfg.log },
  });
  // the first analysis in a fresh worker pays the JIT; let the built-in warm-up drain finish first
  await pool.warm;
  const address = await app.listen({ host: cfg.host, port: cfg.port });
  say(`efflux listening on ${address} (data in ${cfg.dataDir})`);
  if (firstTokenFile) {
    say(`first start: an admin token was written to ${firstTokenFile} (readable by this user only);`);
    say('  sign in with it, keep it safe, delete the file; make people with efflux people add');
  }
  say(`API docs: ${address}/api/docs`); // last line of the start-up banner (tests wait for it)

  return new Promise<number>((resolve) => {
    closeWithGrace({ delay: 20_000 }, async ({ signal, err }) => {
      if (err) app.log.error({ err }, 'stopping after an error');
      else app.log.info({ signal }, 'stopping');
      await app.close(); // stop accepting; let in-flight requests finish
      await pool.close();
      store.close(); // WAL checkpointed on close
      resolve(err ? 70 : 0);
    });
  });
}
