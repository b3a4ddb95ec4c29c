/**
 * The two engines side by side (`npm run bench:http -- SECONDS engines`): real `efflux serve`
 * processes on SQLite (a data folder), on PostgreSQL (one instance) and on PostgreSQL (two
 * instances on one database, the load split between them). For each: GET /api/fits/:id per
 * second and its p99 (autocannon, 10 connections per instance), and a 1 MB upload's latency (one at
 * a time, fitted by the real engine). Then the fleet status of OUTLETS outlets × 10 years of
 * monthly approved fits (bench/fleet-seed.ts, the trend benchmark's fleet), timed as GET
 * /api/fleet computes it (jobs/trend.ts fleetStatus) on the SQLite folder and on a PostgreSQL copy
 * of it (server/store/copy-store.ts, as migrate-store copies).
 * PostgreSQL: EFFLUX_BENCH_DATABASE_URL names a server (a database is created on it per case),
 * else a throw-away one is started as the tests start theirs (scripts/postgres-for-tests.mjs; it
 * runs with fsync off, as a test server: say so beside its numbers). BENCH_FLEET_ONLY=1: the fleet
 * case alone; BENCH_OUTLETS: a smaller fleet.
 */
import autocannon from 'autocannon';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { availableParallelism, cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { DAY_MS } from '../server/core/trend/index.js';
import { fleetStatus } from '../server/jobs/trend.js';
import { copyStore, planTables } from '../server/store/copy-store.js';
import { openStore, SYSTEM_ACTOR, type Store } from '../server/store/index.js';
import { seedFleet } from './fleet-seed.js';

const root = fileURLToPath(new URL('../', import.meta.url));
const seconds = Number(process.argv[2] ?? 5);
const shared = process.env.EFFLUX_SHARED
  ? join(process.env.EFFLUX_SHARED, 'bench')
  : join(root, '../shared/bench');
const OUTLETS = Number(process.env.BENCH_OUTLETS ?? 5000);
const MONTHS = 120;
const UPLOADS = 9;

// biome-ignore lint/suspicious/noExplicitAny: the .mjs helper has no types
const helper: any = await import(join(root, 'scripts/postgres-for-tests.mjs'));
const given = process.env.EFFLUX_BENCH_DATABASE_URL;
const server: { url: string; stop: () => void } = given
  ? { url: given, stop: () => {} }
  : await helper.startThrowawayPostgres();

let dbCount = 0;
async function newDatabase(): Promise<string> {
  const name = `efflux_bench_${process.pid}_${++dbCount}`;
  const c = new pg.Client({ connectionString: server.url });
  await c.connect();
  await c.query(`CREATE DATABASE ${name}`);
  await c.end();
  const u = new URL(server.url);
  u.pathname = `/${name}`;
  return u.toString();
}

interface Instance {
  child: ChildProcess;
  base: string;
}

function startServe(env: NodeJS.ProcessEnv): Promise<Instance> {
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'serve'],
    { env, stdio: ['ignore', 'pipe', 'inherit'] },
  );
  let out = '';
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /listening on (http:\/\/[\d.]+:\d+)/.exec(out);
      if (m && /\/api\/docs\n/.test(out)) resolve({ child, base: m[1] });
    });
    child.on('exit', (c) => reject(new Error(`server exited ${c}:\n${out}`)));
  });
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function httpCase(
  label: string,
  location: { dataDir?: string; databaseUrl?: string },
  instances: number,
) {
  const store = await openStore({ ...location, poolSize: 2 });
  const token = (await store.users.createToken(SYSTEM_ACTOR, 'bench', 'admin')).token;
  const vessel = await store.vessels.create(
    SYSTEM_ACTOR,
    JSON.parse(readFileSync(join(shared, 'vcyl-86400.vessel.json'), 'utf8')),
  );
  await store.close();
  const env = {
    ...process.env,
    EFFLUX_DATA_DIR: location.dataDir ?? mkdtempSync(join(tmpdir(), 'efflux-bench-')),
    EFFLUX_DATABASE_URL: location.databaseUrl ?? '',
    PORT: '0',
    HOST: '127.0.0.1',
    EFFLUX_DEMO: '0',
    EFFLUX_LOG: 'silent',
  };
  const servers = await Promise.all(Array.from({ length: instances }, () => startServe(env)));
  try {
    const auth = { authorization: `Bearer ${token}` };
    const full = readFileSync(join(shared, 'vcyl-86400.csv'));
    const oneMb = full.subarray(0, full.lastIndexOf(0x0a, 1_000_000) + 1);
    const upload = async (base: string) => {
      const form = new FormData();
      form.set('allowDuplicate', 'true');
      form.set('log', new Blob([oneMb]), 'vcyl-1mb.csv');
      const t0 = performance.now();
      const r = await fetch(`${base}/api/vessels/${vessel.id}/tests`, {
        method: 'POST',
        body: form,
        headers: auth,
      });
      if (r.status !== 201) throw new Error(`upload answered ${r.status}: ${await r.text()}`);
      const fitId = (await r.json()).fit.id as number;
      return { ms: performance.now() - t0, fitId };
    };
    let fitId = 0;
    for (const s of servers) fitId = (await upload(s.base)).fitId; // warms each one's pool
    const ms: number[] = [];
    for (let i = 0; i < UPLOADS; i++) ms.push((await upload(servers[i % instances].base)).ms);
    const reads = await Promise.all(
      servers.map((s) =>
        autocannon({
          url: `${s.base}/api/fits/${fitId}`,
          headers: auth,
          connections: 10,
          duration: seconds,
        }),
      ),
    );
    const perSecond = reads.reduce((sum, r) => sum + r.requests.average, 0);
    const p99 = Math.max(...reads.map((r) => r.latency.p99));
    const bad = reads.reduce((sum, r) => sum + r.non2xx + r.errors, 0);
    console.log(
      `${label.padEnd(32)} GET /api/fits/:id ${perSecond.toFixed(0).padStart(6)} req/s, p99 ${p99} ms (${bad} non-2xx or errors)   ` +
        `1 MB upload median ${median(ms).toFixed(0)} ms, max ${Math.max(...ms).toFixed(0)} ms over ${UPLOADS}`,
    );
  } finally {
    for (const s of servers) s.child.kill('SIGTERM');
  }
}

async function fleetTimes(label: string, store: Store, now: number) {
  const t0 = performance.now();
  await fleetStatus(store, {}, now);
  const coldMs = performance.now() - t0;
  const warm: number[] = [];
  for (let i = 0; i < 7; i++) {
    const t1 = performance.now();
    await fleetStatus(store, {}, now);
    warm.push(performance.now() - t1);
  }
  console.log(
    `${label.padEnd(32)} fleet status of ${OUTLETS} outlets: cold ${coldMs.toFixed(0)} ms (every status recomputed), warm median ${median(warm).toFixed(0)} ms over 7`,
  );
}

try {
  console.log(
    `${new Date().toISOString()}; ${cpus()[0]?.model ?? 'cpu'} × ${availableParallelism()}; load average ${loadavg()
      .map((x) => x.toFixed(2))
      .join(
        ' ',
      )}; PostgreSQL ${given ? 'at EFFLUX_BENCH_DATABASE_URL' : 'throw-away (fsync off)'}; ${seconds} s per read case`,
  );
  if (process.env.BENCH_FLEET_ONLY !== '1') {
    await httpCase(
      'SQLite, one instance',
      { dataDir: mkdtempSync(join(tmpdir(), 'efflux-bench-')) },
      1,
    );
    await httpCase('PostgreSQL, one instance', { databaseUrl: await newDatabase() }, 1);
    await httpCase('PostgreSQL, two instances', { databaseUrl: await newDatabase() }, 2);
  }

  const START = Date.UTC(2015, 0, 1);
  const NOW = START + MONTHS * (365.25 / 12) * DAY_MS;
  const at = () => new Date(NOW).toISOString();
  const folder = mkdtempSync(join(tmpdir(), 'efflux-bench-fleet-'));
  const lite = await openStore({ dataDir: folder, now: at });
  const seededMs = await seedFleet(lite.sql, OUTLETS, MONTHS, START);
  console.log(
    `fleet seeded on SQLite in ${(seededMs / 1000).toFixed(1)} s (${OUTLETS * MONTHS} fits)`,
  );
  await fleetTimes('SQLite', lite, NOW);
  const pgStore = await openStore({ databaseUrl: await newDatabase(), now: at, poolSize: 4 });
  const t0 = performance.now();
  await copyStore(lite.sql, pgStore.sql, await planTables(pgStore.sql));
  console.log(`copied into PostgreSQL in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  await pgStore.sql.run('ANALYZE');
  await fleetTimes('PostgreSQL', pgStore, NOW);
  await lite.close();
  await pgStore.close();
} finally {
  server.stop();
}
