/**
 * `efflux serve [--data DIR] [--demo]`: take the data folder's lock (one server per folder), open
 * (create, migrate) the database, print a one-time admin token on first start, listen, then
 * analyse tests left pending by an earlier run in the background; stop gracefully on
 * SIGINT/SIGTERM: in-flight requests finish (every write is one SQLite transaction, so nothing is
 * half-written). The invented demo goes only into an empty folder (marked as the demo's) with --demo.
 * With EFFLUX_DATABASE_URL the records are in that PostgreSQL database instead, shared by any
 * number of instances (no folder lock; the folder keeps the first token's file); the banner names
 * the database without its password.
 */
import closeWithGrace from 'close-with-grace';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildApp } from '../http/app.js';
import { loadDemo } from '../jobs/demo.js';
import { resumePending, StoppingError } from '../jobs/ingest.js';
import { createAnalysisPool, type AnalyzeRunner } from '../jobs/pool.js';
import { lockDataFolder } from '../store/folder-lock.js';
import { openStore, SYSTEM_ACTOR, type Store } from '../store/index.js';
import { EXIT_REFUSED } from './io.js';
import { parseCommandLine } from './options.js';
import { serveConfig } from './serve-config.js';
import { countText } from '../core/format/words.js';

const say = (line: string) => process.stdout.write(`${line}\n`);

/** --demo on a folder that holds real records (the CLI exits 2 with this line). */
export class DemoRefusedError extends Error {
  constructor(dataDir: string, vessels: number, tests: number) {
    super(
      `the data folder ${dataDir} holds real records (${countText(vessels, 'vessel')}, ${countText(tests, 'test')}): the invented demo is loaded ` +
        'only into an empty folder; run the demo in its own (npm start uses ./data-demo)',
    );
    this.name = 'DemoRefusedError';
  }
}

/** May the demo go into this store? True to load it now, false when it is the demo's already. */
async function demoWanted(store: Store, dataDir: string): Promise<boolean> {
  if (await store.meta.isDemo())
    return (await store.vessels.count()) === 0 && (await store.tests.count()) === 0;
  if ((await store.vessels.count()) > 0 || (await store.tests.count()) > 0)
    throw new DemoRefusedError(dataDir, await store.vessels.count(), await store.tests.count());
  return true;
}

export async function run(argv: string[]): Promise<number> {
  const { values } = parseCommandLine(argv, {
    data: { type: 'string' },
    demo: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) {
    say(
      'usage: efflux serve [--data DIR] [--demo]   (other settings from the environment: see .env.example)',
    );
    say(
      '  --data DIR  the data folder (default EFFLUX_DATA_DIR, else ./data; ./data-demo with --demo)',
    );
    say(
      '  --demo      load the invented demo scenario into an empty folder (refused where real records are)',
    );
    return 0;
  }
  const cfg = serveConfig(process.env, { dataDir: values.data, demo: values.demo });
  // One server per data folder on SQLite; on PostgreSQL any number share the database (each has a
  // folder for its own files), so there is no folder lock to take.
  const lock = cfg.databaseUrl
    ? { release: () => {} }
    : lockDataFolder(cfg.dataDir, `efflux serve${cfg.demo ? ' --demo' : ''}`); // FolderBusyError → exit 2
  let store: Store;
  try {
    if (cfg.databaseUrl) mkdirSync(cfg.dataDir, { recursive: true }); // the first token's file goes there
    store = await openStore({
      dataDir: cfg.dataDir,
      databaseUrl: cfg.databaseUrl,
      onDatabaseError: (e) => process.stderr.write(`efflux: database connection: ${e.message}\n`),
    });
  } catch (e) {
    lock.release();
    throw e;
  }
  const pool = createAnalysisPool({
    threads: cfg.workers,
    timeoutMs: cfg.analysisTimeoutMs,
    analyzeModule: cfg.analyzeModule,
    niceness: cfg.workerNice,
  });
  const stopEarly = async (code: number) => {
    await pool.close();
    await store.close();
    lock.release();
    return code;
  };

  try {
    if (cfg.demo && (await demoWanted(store, cfg.dataDir))) {
      await store.meta.markDemo(SYSTEM_ACTOR); // before anything invented is written
      const r = await loadDemo(store, pool.run, cfg.demoManifest);
      say(r.note);
      for (const s of r.skipped) say(`  skipped ${s}`);
    }
  } catch (e) {
    if (e instanceof DemoRefusedError) {
      process.stderr.write(`efflux: ${e.message}\n`);
      return stopEarly(EXIT_REFUSED);
    }
    await stopEarly(0);
    throw e;
  }
  // The first admin token goes to a file only its owner can read, never to the output (logs are
  // collected and kept by process managers); the person reads it, keeps it, deletes the file.
  let firstTokenFile: string | null = null;
  if ((await store.users.count()) === 0) {
    const { token } = await store.users.createToken(SYSTEM_ACTOR, 'admin', 'admin', 'first-start');
    firstTokenFile = join(cfg.dataDir, 'first-admin-token.txt');
    writeFileSync(firstTokenFile, `${token}\n`, { mode: 0o600, flag: 'w' });
  }
  const undated = await store.tests.undated();
  if (undated.length)
    say(
      `note: ${countText(undated.length, 'old test')} ${undated.length === 1 ? 'has' : 'have'} no date (no date stated, elapsed-time log) and stay out of the trend: ${undated.map((u) => u.testId).join(', ')} (efflux audit verify lists why)`,
    );

  const app = await buildApp({
    store,
    analyze: pool.run,
    uploadLimitBytes: cfg.uploadLimitBytes,
    requestTimeoutMs: cfg.requestTimeoutMs,
    secureCookie: cfg.secureCookie,
    trustProxy: cfg.trustProxy,
    signInPerMinute: cfg.signInPerMinute,
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
  // where the records are; a database address without its password
  const where =
    store.engine.kind === 'postgres' ? `database ${store.engine.url}` : `data in ${cfg.dataDir}`;
  say(
    `efflux listening on ${address} (${where}${(await store.meta.isDemo()) ? '; DEMO data, invented' : ''})`,
  );
  if (firstTokenFile) {
    say(
      `first start: an admin token was written to ${firstTokenFile} (readable by this user only);`,
    );
    say('  sign in with it, keep it safe, delete the file; make people with efflux people add');
  }
  say(`API docs: ${address}/api/docs`); // last line of the start-up banner (tests wait for it)

  // after listen, in the background: one test's failure is noted and the next goes on
  let stopping = false;
  const resumeRun: AnalyzeRunner = async (req, timing) => {
    if (stopping) throw new StoppingError();
    try {
      return await pool.run(req, timing);
    } catch (e) {
      throw stopping ? new StoppingError() : e;
    }
  };
  const resumed = resumePending(store, resumeRun, SYSTEM_ACTOR).then(
    (r) => {
      if (r.done + r.refused + r.failed.length > 0 || r.stuck > 0) {
        app.log.info({ ...r }, 'tests left pending by an earlier run');
        say(
          `pending tests from an earlier run: ${r.done} analysed, ${r.refused} refused and withdrawn, ${r.failed.length} failed again` +
            (r.stuck ? `, ${r.stuck} left for a person (failed 3 times: retry or withdraw)` : ''),
        );
      }
    },
    (e: Error) => app.log.error({ err: e }, 'resuming pending tests stopped'),
  );

  return new Promise<number>((resolve) => {
    closeWithGrace({ delay: 20_000 }, async ({ signal, err }) => {
      if (err) app.log.error({ err }, 'stopping after an error');
      else app.log.info({ signal }, 'stopping');
      stopping = true;
      await app.close(); // stop accepting; let in-flight requests finish
      await pool.close(); // a resume still running ends with its analysis refused (noted as a failure)
      await resumed.catch(() => undefined);
      await store.close(); // WAL checkpointed on close
      lock.release();
      resolve(err ? 70 : 0);
    });
  });
}
