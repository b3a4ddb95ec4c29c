/**
 * HTTP throughput on loopback against a real listening server (its own temp data folder):
 * reads of a fit and of a vessel's test list, and 1 MB uploads fitted by the real engine; then
 * reads while uploads run, and one upload's time split into its steps (its Server-Timing header).
 * Run: node --import tsx bench/http.ts [seconds-per-case]   (prints requests/s and latencies)
 */
import autocannon from 'autocannon';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../', import.meta.url));
const seconds = Number(process.argv[2] ?? 8);
const shared = process.env.EFFLUX_SHARED ? join(process.env.EFFLUX_SHARED, 'bench') : join(root, '../shared/bench'); // as bench/run.ts

async function startServer() {
  const dataDir = mkdtempSync(join(tmpdir(), 'efflux-bench-'));
  const env = { ...process.env, EFFLUX_DATA_DIR: dataDir, PORT: '0', EFFLUX_DEMO: '0', EFFLUX_LOG: 'silent' };
  const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'serve'], { env, stdio: ['ignore', 'pipe', 'inherit'] });
  let out = '';
  const base = await new Promise<string>((resolve, reject) => {
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /listening on (http:\/\/[\d.]+:\d+)/.exec(out);
      if (m && /\/api\/docs\n/.test(out)) resolve(m[1]);
    });
    child.on('exit', (c) => reject(new Error(`server exited ${c}`)));
  });
  const token = readFileSync(join(dataDir, 'first-admin-token.txt'), 'utf8').trim(); // never in the output
  return { child, base, token };
}

function multipartBody(bytes: Buffer, name: string) {
  const boundary = '----effluxbench';
  const body = Buffer.concat([
    // the same bytes again and again, on purpose: a second copy is otherwise refused (409)
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="allowDuplicate"\r\n\r\ntrue\r\n`),
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="log"; filename="${name}"\r\nContent-Type: text/csv\r\n\r\n`),
    bytes,
    Buffer.from(`\r\n--${boundary}--\r\n`),
  ]);
  return { body, contentType: `multipart/form-data; boundary=${boundary}` };
}

function report(label: string, r: autocannon.Result) {
  const l = r.latency;
  console.log(
    `${label.padEnd(34)} ${r.requests.average.toFixed(0).padStart(6)} req/s   p50 ${l.p50} ms   p99 ${l.p99} ms   max ${l.max} ms   ` +
      `(${r.requests.total} requests, ${r.non2xx} non-2xx, ${r.errors} errors, ${r.connections} connections)`,
  );
}

const { child, base, token } = await startServer();
try {
  const auth = { authorization: `Bearer ${token}` };
  const vessel = await (await fetch(`${base}/api/vessels`, { method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body: readFileSync(join(shared, 'vcyl-86400.vessel.json')) })).json();
  // a 1 MB prefix of the shared 10 Hz log, cut at a line end
  const full = readFileSync(join(shared, 'vcyl-86400.csv'));
  const oneMb = full.subarray(0, full.lastIndexOf(0x0a, 1_000_000) + 1);
  const up = multipartBody(oneMb, 'vcyl-1mb.csv');
  let fitId = 0;
  const upload = async () => {
    const t0 = performance.now();
    const r = await fetch(`${base}/api/vessels/${vessel.id}/tests`, { method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body });
    if (r.status !== 201) throw new Error(`upload answered ${r.status}: ${await r.text()}`);
    fitId = (await r.json()).fit.id;
    return { ms: performance.now() - t0, serverTiming: r.headers.get('server-timing') ?? '' };
  };
  const firstMs = (await upload()).ms;
  for (let i = 1; i < 20; i++) await upload();
  console.log(`first upload after start ${firstMs.toFixed(0)} ms (the pool warms up at start)`);
  const fitBytes = (await (await fetch(`${base}/api/fits/${fitId}`, { headers: auth })).arrayBuffer()).byteLength;
  console.log(`load average ${loadavg().map((x) => x.toFixed(2)).join(' ')} (${availableParallelism()} cores)`);
  console.log(`server ${base}; fit JSON ${(fitBytes / 1024).toFixed(1)} KiB; upload ${(oneMb.length / 1e6).toFixed(2)} MB; ${seconds} s per case`);

  report('GET /api/fits/:id', await autocannon({ url: `${base}/api/fits/${fitId}`, headers: auth, connections: 10, duration: seconds }));
  report('GET /api/vessels/:id/tests (20)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests?limit=20`, headers: auth, connections: 10, duration: seconds }));
  report('GET /api/health', await autocannon({ url: `${base}/api/health`, connections: 10, duration: seconds }));
  report('POST 1 MB upload (1 at a time)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests`, method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body, connections: 1, duration: seconds }));
  report('POST 1 MB upload (4 at a time)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests`, method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body, connections: 4, duration: seconds }));

  // reads at the goal's rate (2000/s) while uploads run one after another: reads keep their p99?
  const paced = { url: `${base}/api/fits/${fitId}`, headers: auth, connections: 10, overallRate: 2000, duration: seconds }; // overallRate: not in the local type stub
  const [reads, uploads] = await Promise.all([
    autocannon(paced),
    autocannon({ url: `${base}/api/vessels/${vessel.id}/tests`, method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body, connections: 1, duration: seconds }),
  ]);
  report('GET /api/fits/:id 2000/s during uploads', reads);
  report('POST 1 MB upload during reads', uploads);

  // one upload at a time, its steps from Server-Timing (medians over the runs)
  const runs: { ms: number; parts: Map<string, number> }[] = [];
  for (let i = 0; i < 15; i++) {
    const r = await upload();
    runs.push({ ms: r.ms, parts: new Map(r.serverTiming.split(',').map((p) => /^\s*([\w-]+);dur=([\d.]+)/.exec(p)).filter((m) => m !== null).map((m) => [m[1], Number(m[2])])) });
  }
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const names = [...runs[0].parts.keys()];
  const total = median(runs.map((r) => r.ms));
  const steps = names.map((n) => `${n} ${median(runs.map((r) => r.parts.get(n) ?? 0)).toFixed(1)}`);
  const inServer = median(runs.map((r) => [...r.parts.values()].reduce((a, b) => a + b, 0)));
  const engine = median(runs.map((r) => r.parts.get('engine') ?? 0));
  console.log(`1 MB upload, ${runs.length} one at a time, medians in ms: client ${total.toFixed(1)} = ${steps.join(', ')}, other (client, HTTP) ${(total - inServer).toFixed(1)}`);
  console.log(`  engine ${engine.toFixed(1)} ms (${((100 * engine) / total).toFixed(0)} %), service ${(total - engine).toFixed(1)} ms`);
} finally {
  child.kill('SIGTERM');
}
