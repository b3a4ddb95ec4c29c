/**
 * `npm run bench`: fits the shared benchmark logs with `efflux fit --json`, one fresh process per
 * run as a person would start it, and reports the in-process timing the command prints (parse,
 * fit, diagnostics) and the peak memory; then runs the reader, window and trend benchmarks.
 * Speed is measured here, never asserted in tests.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, existsSync(join(here, '..', 'package.json')) ? '..' : '../..');
// The shared folder holds the benchmark workloads: EFFLUX_SHARED, else ../shared beside the project.
const sharedRoot = process.env.EFFLUX_SHARED
  ? resolve(process.env.EFFLUX_SHARED)
  : resolve(root, '..', 'shared');
const shared = join(sharedRoot, 'bench');
const cli = join(root, 'bin', 'efflux.js');
const runs = Number(process.env.BENCH_RUNS ?? 5);

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

interface Row {
  file: string;
  cd: number;
  parseMs: number;
  fitMs: number;
  diagnosticsMs: number;
  peakRssMB: number;
  evaluations: number;
}

function fitOnce(name: string): Row {
  const csv = join(shared, `${name}.csv`);
  const vessel = join(shared, `${name}.vessel.json`);
  const out = spawnSync(process.execPath, [cli, 'fit', csv, '--vessel', vessel, '--json'], {
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
  });
  if (out.status !== 0) throw new Error(`efflux fit ${name} failed: ${out.stderr}`);
  const fit = JSON.parse(out.stdout);
  return {
    file: name,
    cd: fit.dischargeCoefficient.value,
    parseMs: fit.timing.parseMs,
    fitMs: fit.timing.fitMs,
    diagnosticsMs: fit.timing.diagnosticsMs,
    peakRssMB: fit.timing.peakRssMB,
    evaluations: fit.solver.evaluations,
  };
}

const USAGE = `usage: npm run bench [-- --help]

Fits the shared benchmark logs (vcyl-86400, hcyl-86400) in fresh processes, then runs the reader,
drain-window, trend and HTTP benchmarks. Settings come from the environment:
  EFFLUX_SHARED=PATH     the shared folder holding bench/ (default ../shared beside the project)
  BENCH_RUNS=N           fresh processes per log (default 5)
  BENCH_HTTP=0           skip the HTTP benchmark;  BENCH_HTTP_SECONDS=S  its length (default 6)
`;
if (process.argv.includes('--help') || process.argv.includes('-h')) {
  process.stdout.write(USAGE);
  process.exit(0);
}
if (!existsSync(shared)) {
  const from = process.env.EFFLUX_SHARED
    ? `EFFLUX_SHARED=${process.env.EFFLUX_SHARED}`
    : 'the default, ../shared beside the project';
  console.error(
    `bench: no benchmark folder at ${shared} (from ${from}); set EFFLUX_SHARED to the shared folder`,
  );
  process.exit(2);
}
console.log(
  `efflux fit --json on the shared benchmark logs, ${runs} fresh processes each: median (min); a shared machine's load shows in the spread`,
);
console.log(
  'file             Cd          parse ms        fit ms          diagnostics ms   peak RSS MB  main-fit evaluations',
);
for (const name of ['vcyl-86400', 'hcyl-86400']) {
  const rows: Row[] = [];
  for (let i = 0; i < runs; i++) {
    process.stderr.write(`  ${name}: run ${i + 1}/${runs}\r`);
    rows.push(fitOnce(name));
  }
  const m = (k: keyof Row) => median(rows.map((r) => r[k] as number));
  const lo = (k: keyof Row) => Math.min(...rows.map((r) => r[k] as number));
  const ms = (k: keyof Row) => `${m(k).toFixed(1)} (${lo(k).toFixed(1)})`.padStart(15);
  console.log(
    `${name.padEnd(17)}${m('cd').toFixed(6).padEnd(12)}${ms('parseMs')} ${ms('fitMs')} ${ms('diagnosticsMs')} ${m('peakRssMB').toFixed(0).padStart(13)} ${String(m('evaluations')).padStart(21)}`,
  );
}

for (const [script, label] of [
  ['ingest.js', 'reader: 1 000 000-row log'],
  ['window.js', 'drain window'],
  ['trend.js', 'trend: 5 000 outlets × 10 years'],
] as const) {
  const path = join(here, script);
  if (!existsSync(path)) continue;
  console.log(`\n${label}:`);
  const r = spawnSync(process.execPath, ['--expose-gc', path], { stdio: 'inherit' });
  if (r.status !== 0) console.log(`  (${script} exited ${r.status})`);
}

// HTTP throughput on loopback (a real server in a temp folder); BENCH_HTTP=0 skips it
if (process.env.BENCH_HTTP !== '0' && existsSync(join(root, 'bench', 'http.ts'))) {
  console.log('\nHTTP on loopback (autocannon):');
  const r = spawnSync(
    process.execPath,
    ['--import', 'tsx', join(root, 'bench', 'http.ts'), process.env.BENCH_HTTP_SECONDS ?? '6'],
    { stdio: 'inherit', cwd: root, env: { ...process.env, EFFLUX_SHARED: sharedRoot } },
  );
  if (r.status !== 0) console.log(`  (http.ts exited ${r.status})`);
}
