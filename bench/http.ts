/**
 * HTTP throughput on loopback against a real listening server (its own temp data folder):
 * reads of a fit and of a vessel's test list, and 1 MB uploads fitted by the real engine.
 * Run: node --import tsx bench/http.ts [seconds-per-case]   (prints requests/s and latencies)
 */
import autocannon from 'autocannon';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../', import.meta.url));
const seconds = Number(process.argv[2] ?? 8);
const shared = join(root, '../shared/bench');

async function startServer() {
  const env = { ...process.env, EFFLUX_DATA_DIR: mkdtempSync(join(tmpdir(), 'efflux-bench-')), PORT: '0', EFFLUX_DEMO: '0', EFFLUX_LOG: 'silent' };
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
  const token = /keep it safe:\n\s+(\S+)/.exec(out)![1];
  return { child, base, token };
}

function multipartBody(bytes: Buffer, name: string) {
  const boundary = '----effluxbench';
  const body = Buffer.concat([
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
  for (let i = 0; i < 20; i++) {
    const r = await fetch(`${base}/api/vessels/${vessel.id}/tests`, { method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body });
    if (r.status !== 201) throw new Error(`seed upload answered ${r.status}: ${await r.text()}`);
    fitId = (await r.json()).fit.id;
  }
  const fitBytes = (await (await fetch(`${base}/api/fits/${fitId}`, { headers: auth })).arrayBuffer()).byteLength;
  console.log(`server ${base}; fit JSON ${(fitBytes / 1024).toFixed(1)} KiB; upload ${(oneMb.length / 1e6).toFixed(2)} MB; ${seconds} s per case`);

  report('GET /api/fits/:id', await autocannon({ url: `${base}/api/fits/${fitId}`, headers: auth, connections: 10, duration: seconds }));
  report('GET /api/vessels/:id/tests (20)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests?limit=20`, headers: auth, connections: 10, duration: seconds }));
  report('GET /api/health', await autocannon({ url: `${base}/api/health`, connections: 10, duration: seconds }));
  report('POST 1 MB upload (1 at a time)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests`, method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body, connections: 1, duration: seconds }));
  report('POST 1 MB upload (4 at a time)', await autocannon({ url: `${base}/api/vessels/${vessel.id}/tests`, method: 'POST', headers: { ...auth, 'content-type': up.contentType }, body: up.body, connections: 4, duration: seconds }));
} finally {
  child.kill('SIGTERM');
}
