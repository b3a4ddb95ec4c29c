// A PostgreSQL server for the tests. EFFLUX_TEST_DATABASE_URL set → that server is used (a role
// that may CREATE DATABASE). Unset → a throw-away cluster: initdb in a temporary folder, started
// on 127.0.0.1 on a free port (as the `postgres` user when run as root: PostgreSQL refuses root),
// stopped and removed at the end. Tuned for tests only (fsync off: a crash loses the cluster,
// which is thrown away anyway).
//
// Three uses:
// - vitest globalSetup of the `postgres` project (vitest.config.ts): provides the server's URL, or
//   the reason there is none, which then fails every PostgreSQL test file with that message;
// - `node scripts/postgres-for-tests.mjs -- CMD ARGS…`: runs CMD with EFFLUX_TEST_DATABASE_URL
//   set, then stops the cluster (exit status of CMD);
// - `node scripts/postgres-for-tests.mjs` alone: starts one, prints `export EFFLUX_TEST_DATABASE_URL=…`
//   and keeps it until Ctrl-C.
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { chmodSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';

export const HOW_TO_START =
  'Set EFFLUX_TEST_DATABASE_URL=postgres://USER@HOST:PORT/postgres (a role allowed to CREATE DATABASE), ' +
  'or install PostgreSQL 15 (Debian: apt-get install postgresql-15) so the tests can start a throw-away ' +
  'server themselves; or run only the SQLite tests with `npx vitest run --project sqlite`.';

/** The folder holding initdb and pg_ctl: EFFLUX_PG_BINDIR, pg_config --bindir, /usr/lib/postgresql/<newest>/bin. */
export function findPostgresBin() {
  const has = (dir) => dir && existsSync(join(dir, 'initdb')) && existsSync(join(dir, 'pg_ctl'));
  if (process.env.EFFLUX_PG_BINDIR)
    return has(process.env.EFFLUX_PG_BINDIR) ? process.env.EFFLUX_PG_BINDIR : null;
  try {
    const dir = execFileSync('pg_config', ['--bindir'], {
      encoding: 'utf8',
      stdio: ['ignore', 'pipe', 'ignore'],
    }).trim();
    if (has(dir)) return dir;
  } catch {}
  const root = '/usr/lib/postgresql';
  if (existsSync(root)) {
    const versions = readdirSync(root)
      .filter((v) => /^\d+$/.test(v))
      .sort((a, b) => Number(b) - Number(a));
    for (const v of versions) if (has(join(root, v, 'bin'))) return join(root, v, 'bin');
  }
  return null;
}

function freePort() {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address();
      s.close(() => resolve(port));
    });
  });
}

/** Runs a PostgreSQL program, as the `postgres` user when we are root. */
function pgRun(bin, prog, args) {
  const asRoot = process.getuid?.() === 0;
  const cmd = asRoot ? 'runuser' : join(bin, prog);
  const argv = asRoot ? ['-u', 'postgres', '--', join(bin, prog), ...args] : args;
  const r = spawnSync(cmd, argv, { encoding: 'utf8' });
  if (r.status !== 0)
    throw new Error(
      `${prog} failed (${r.status ?? r.signal}): ${(r.stderr || r.stdout || r.error?.message || '').trim().slice(-800)}`,
    );
  return r.stdout;
}

/** Starts a throw-away cluster; resolves to { url, stop() }. */
export async function startThrowawayPostgres() {
  const bin = findPostgresBin();
  if (!bin)
    throw new Error(`no PostgreSQL server programs found (initdb, pg_ctl). ${HOW_TO_START}`);
  const dir = mkdtempSync(join(tmpdir(), 'efflux-pg-'));
  if (process.getuid?.() === 0) execFileSync('chown', ['postgres', dir]);
  else chmodSync(dir, 0o700);
  const data = join(dir, 'data');
  const port = await freePort();
  let started = false;
  const stop = () => {
    if (started) {
      try {
        pgRun(bin, 'pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']);
      } catch {}
      started = false;
    }
    rmSync(dir, { recursive: true, force: true });
  };
  try {
    pgRun(bin, 'initdb', [
      '-D',
      data,
      '-A',
      'trust',
      '-U',
      'efflux',
      '-E',
      'UTF8',
      '--locale=C',
      '--no-sync',
    ]);
    const opts = [
      `-p ${port}`,
      `-k ${dir}`,
      '-c listen_addresses=127.0.0.1',
      '-c fsync=off',
      '-c synchronous_commit=off',
      '-c full_page_writes=off',
      '-c max_connections=300',
    ].join(' ');
    started = true;
    pgRun(bin, 'pg_ctl', [
      '-D',
      data,
      '-o',
      opts,
      '-l',
      join(dir, 'log'),
      '-w',
      '-t',
      '60',
      'start',
    ]);
  } catch (e) {
    stop();
    throw e;
  }
  process.once('exit', stop); // a run that ends abruptly still stops its server
  return { url: `postgres://efflux@127.0.0.1:${port}/postgres`, stop };
}

/** Drops the databases this run made on a server it did not start (efflux_t_RUN_…, efflux_tpl_RUN). */
async function dropRunDatabases(url, runId) {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const { rows } = await client.query(
      "SELECT datname FROM pg_database WHERE datname LIKE 'efflux\\_t\\_' || $1 || '\\_%' OR datname = 'efflux_tpl_' || $1",
      [runId],
    );
    for (const { datname } of rows)
      await client.query(`DROP DATABASE IF EXISTS "${datname}" WITH (FORCE)`);
  } finally {
    await client.end();
  }
}

/**
 * vitest globalSetup: provides `postgresUrl` (or `postgresProblem`) to the postgres project, and
 * `postgresRunId`, which names this run's databases (test/support/postgres.ts).
 */
export default async function setup(project) {
  const runId = randomBytes(4).toString('hex');
  project.provide('postgresRunId', runId);
  const given = process.env.EFFLUX_TEST_DATABASE_URL;
  if (given) {
    const client = new pg.Client({ connectionString: given, connectionTimeoutMillis: 10_000 });
    try {
      await client.connect();
      project.provide('postgresUrl', given);
      return () => dropRunDatabases(given, runId);
    } catch (e) {
      project.provide(
        'postgresProblem',
        `EFFLUX_TEST_DATABASE_URL names a server that does not answer (${e.message}). ${HOW_TO_START}`,
      );
    } finally {
      await client.end().catch(() => {});
    }
    return;
  }
  try {
    const t0 = Date.now();
    const { url, stop } = await startThrowawayPostgres();
    console.log(
      `postgres-for-tests: throw-away server at ${url} (started in ${Date.now() - t0} ms)`,
    );
    project.provide('postgresUrl', url);
    return stop;
  } catch (e) {
    project.provide('postgresProblem', e.message);
  }
}

// Command-line use
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const sep = process.argv.indexOf('--');
  const cmd = sep >= 0 ? process.argv.slice(sep + 1) : [];
  let server;
  try {
    server = process.env.EFFLUX_TEST_DATABASE_URL
      ? { url: process.env.EFFLUX_TEST_DATABASE_URL, stop: () => {} }
      : await startThrowawayPostgres();
  } catch (e) {
    console.error(`postgres-for-tests: ${e.message}`);
    process.exit(2);
  }
  if (cmd.length === 0) {
    console.log(`export EFFLUX_TEST_DATABASE_URL=${server.url}`);
    console.log('postgres-for-tests: running; Ctrl-C stops and removes it');
    const end = () => {
      server.stop();
      process.exit(0);
    };
    process.on('SIGINT', end);
    process.on('SIGTERM', end);
    setInterval(() => {}, 1 << 30);
  } else {
    const child = spawn(cmd[0], cmd.slice(1), {
      stdio: 'inherit',
      env: { ...process.env, EFFLUX_TEST_DATABASE_URL: server.url },
    });
    const forward = (sig) => child.kill(sig);
    process.on('SIGINT', forward);
    process.on('SIGTERM', forward);
    child.on('exit', (code, signal) => {
      server.stop();
      process.exit(code ?? (signal ? 1 : 0));
    });
  }
}
