/**
 * HTTP throughput on loopback against a real listening server (its own temp data folder):
 * reads of a fit and of a vessel's test list, and 1 MB uploads fitted by the real engine; then
 * reads while uploads run, and one upload's time split into its steps (its Server-Timing header).
 * Then (a second server, with the invented demo loaded) the heavy case: reads of health and of a
 * fit while a PDF of a fit with the longest fields, an export of every demo fit and the series of
 * a 1 000 000-row log are being made, over and over, for the case's seconds.
 * Run: node --import tsx bench/http.ts [seconds-per-case] [all|throughput|heavy|engines]
 * (engines: SQLite and PostgreSQL side by side, one and two instances: bench/http-engines.ts)
 * (prints requests/s and latencies; the throughput cases need the shared bench logs)
 */
import autocannon from 'autocannon';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../', import.meta.url));
const seconds = Number(process.argv[2] ?? 8);
const which = process.argv[3] ?? 'all';
const shared = process.env.EFFLUX_SHARED
  ? join(process.env.EFFLUX_SHARED, 'bench')
  : join(root, '../shared/bench'); // as bench/run.ts

async function startServer(demo = false) {
  const dataDir = mkdtempSync(join(tmpdir(), 'efflux-bench-'));
  const env = {
    ...process.env,
    EFFLUX_DATA_DIR: dataDir,
    PORT: '0',
    EFFLUX_DEMO: demo ? '1' : '0',
    EFFLUX_LOG: 'silent',
  };
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', join(root, 'server/cli/main.ts'), 'serve'],
    { env, stdio: ['ignore', 'pipe', 'inherit'] },
  );
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
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="allowDuplicate"\r\n\r\ntrue\r\n`,
    ),
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="log"; filename="${name}"\r\nContent-Type: text/csv\r\n\r\n`,
    ),
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

async function throughput() {
  const { child, base, token } = await startServer();
  try {
    const auth = { authorization: `Bearer ${token}` };
    const vessel = await (
      await fetch(`${base}/api/vessels`, {
        method: 'POST',
        headers: { ...auth, 'content-type': 'application/json' },
        body: readFileSync(join(shared, 'vcyl-86400.vessel.json')),
      })
    ).json();
    // a 1 MB prefix of the shared 10 Hz log, cut at a line end
    const full = readFileSync(join(shared, 'vcyl-86400.csv'));
    const oneMb = full.subarray(0, full.lastIndexOf(0x0a, 1_000_000) + 1);
    const up = multipartBody(oneMb, 'vcyl-1mb.csv');
    let fitId = 0;
    const upload = async () => {
      const t0 = performance.now();
      const r = await fetch(`${base}/api/vessels/${vessel.id}/tests`, {
        method: 'POST',
        headers: { ...auth, 'content-type': up.contentType },
        body: up.body,
      });
      if (r.status !== 201) throw new Error(`upload answered ${r.status}: ${await r.text()}`);
      fitId = (await r.json()).fit.id;
      return { ms: performance.now() - t0, serverTiming: r.headers.get('server-timing') ?? '' };
    };
    const firstMs = (await upload()).ms;
    for (let i = 1; i < 20; i++) await upload();
    console.log(`first upload after start ${firstMs.toFixed(0)} ms (the pool warms up at start)`);
    const fitBytes = (
      await (await fetch(`${base}/api/fits/${fitId}`, { headers: auth })).arrayBuffer()
    ).byteLength;
    console.log(
      `load average ${loadavg()
        .map((x) => x.toFixed(2))
        .join(' ')} (${availableParallelism()} cores)`,
    );
    console.log(
      `server ${base}; fit JSON ${(fitBytes / 1024).toFixed(1)} KiB; upload ${(oneMb.length / 1e6).toFixed(2)} MB; ${seconds} s per case`,
    );

    report(
      'GET /api/fits/:id',
      await autocannon({
        url: `${base}/api/fits/${fitId}`,
        headers: auth,
        connections: 10,
        duration: seconds,
      }),
    );
    report(
      'GET /api/vessels/:id/tests (20)',
      await autocannon({
        url: `${base}/api/vessels/${vessel.id}/tests?limit=20`,
        headers: auth,
        connections: 10,
        duration: seconds,
      }),
    );
    report(
      'GET /api/health',
      await autocannon({ url: `${base}/api/health`, connections: 10, duration: seconds }),
    );
    report(
      'POST 1 MB upload (1 at a time)',
      await autocannon({
        url: `${base}/api/vessels/${vessel.id}/tests`,
        method: 'POST',
        headers: { ...auth, 'content-type': up.contentType },
        body: up.body,
        connections: 1,
        duration: seconds,
      }),
    );
    report(
      'POST 1 MB upload (4 at a time)',
      await autocannon({
        url: `${base}/api/vessels/${vessel.id}/tests`,
        method: 'POST',
        headers: { ...auth, 'content-type': up.contentType },
        body: up.body,
        connections: 4,
        duration: seconds,
      }),
    );

    // reads at the goal's rate (2000/s) while uploads run one after another: reads keep their p99?
    const paced = {
      url: `${base}/api/fits/${fitId}`,
      headers: auth,
      connections: 10,
      overallRate: 2000,
      duration: seconds,
    }; // overallRate: not in the local type stub
    const [reads, uploads] = await Promise.all([
      autocannon(paced),
      autocannon({
        url: `${base}/api/vessels/${vessel.id}/tests`,
        method: 'POST',
        headers: { ...auth, 'content-type': up.contentType },
        body: up.body,
        connections: 1,
        duration: seconds,
      }),
    ]);
    report('GET /api/fits/:id 2000/s during uploads', reads);
    report('POST 1 MB upload during reads', uploads);

    // one upload at a time, its steps from Server-Timing (medians over the runs)
    const runs: { ms: number; parts: Map<string, number> }[] = [];
    for (let i = 0; i < 15; i++) {
      const r = await upload();
      runs.push({
        ms: r.ms,
        parts: new Map(
          r.serverTiming
            .split(',')
            .map((p) => /^\s*([\w-]+);dur=([\d.]+)/.exec(p))
            .filter((m) => m !== null)
            .map((m) => [m[1], Number(m[2])]),
        ),
      });
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const names = [...runs[0].parts.keys()];
    const total = median(runs.map((r) => r.ms));
    const steps = names.map(
      (n) => `${n} ${median(runs.map((r) => r.parts.get(n) ?? 0)).toFixed(1)}`,
    );
    const inServer = median(runs.map((r) => [...r.parts.values()].reduce((a, b) => a + b, 0)));
    const engine = median(runs.map((r) => r.parts.get('engine') ?? 0));
    console.log(
      `1 MB upload, ${runs.length} one at a time, medians in ms: client ${total.toFixed(1)} = ${steps.join(', ')}, other (client, HTTP) ${(total - inServer).toFixed(1)}`,
    );
    console.log(
      `  engine ${engine.toFixed(1)} ms (${((100 * engine) / total).toFixed(0)} %), service ${(total - engine).toFixed(1)} ms`,
    );
  } finally {
    child.kill('SIGTERM');
  }
}

/** An invented drain of a 3.0 m upright cylinder through a 30 mm sharp-edged orifice (Cd 0.61), 100 readings a second, with a little seeded noise. */
function drainLog(rows: number): Buffer {
  const c = (0.61 * Math.PI * 0.015 ** 2 * Math.sqrt(2 * 9.80665)) / (2 * Math.PI * 1.5 ** 2);
  const dt = Math.sqrt(2.0) / c / rows;
  const parts: string[] = ['elapsed (s),level (m)\n'];
  let seed = 12345;
  for (let i = 0; i < rows; i++) {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    const root = Math.max(0, Math.sqrt(2.0) - c * i * dt);
    parts.push(
      `${(i * dt).toFixed(3)},${(root * root + 0.0005 * (seed / 2147483648 - 0.5)).toFixed(5)}\n`,
    );
  }
  return Buffer.from(parts.join(''));
}

function multipartWith(bytes: Buffer, name: string, fields: Record<string, string>) {
  const boundary = '----effluxbenchheavy';
  const texts = Object.entries(fields).map(([k, v]) =>
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`),
  );
  const body = Buffer.concat([
    ...texts,
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="log"; filename="${name}"\r\nContent-Type: text/csv\r\n\r\n`,
    ),
    bytes,
    Buffer.from(`\r\n--${boundary}--\r\n`),
  ]);
  return { body, contentType: `multipart/form-data; boundary=${boundary}` };
}

/** Heavy work in a loop until `until`; each round's ms. */
async function repeat(until: number, once: () => Promise<void>): Promise<number[]> {
  const ms: number[] = [];
  while (performance.now() < until) {
    const t0 = performance.now();
    await once();
    ms.push(performance.now() - t0);
  }
  return ms;
}

async function heavy() {
  const t0 = performance.now();
  const { child, base, token } = await startServer(true);
  try {
    const auth = { authorization: `Bearer ${token}` };
    const json = { ...auth, 'content-type': 'application/json' };
    const startMs = performance.now() - t0;
    const vessel = await (
      await fetch(`${base}/api/vessels`, {
        method: 'POST',
        headers: json,
        body: JSON.stringify({
          name: 'Bench tank B-1 (invented)',
          site: 'Kestrel Fen bench (fictional)',
          shape: { kind: 'vertical-cylinder', diameterM: 3.0 },
          outlet: { boreM: 0.03, elevationM: 0, type: 'sharp-edged' },
          sensor: { zeroElevationM: 0 },
        }),
      })
    ).json();
    const post = async (bytes: Buffer, name: string, fields: Record<string, string>) => {
      const m = multipartWith(bytes, name, fields);
      const r = await fetch(`${base}/api/vessels/${vessel.id}/tests`, {
        method: 'POST',
        headers: { ...auth, 'content-type': m.contentType },
        body: m.body,
      });
      if (r.status !== 201) throw new Error(`upload answered ${r.status}: ${await r.text()}`);
      return (await r.json()) as { test: { id: number }; fit: { id: number } };
    };
    // a fit whose report carries the longest fields the service takes (a 10 000-character unbroken note)
    const long = await post(drainLog(5_000), 'long-fields.csv', {
      notes: 'n'.repeat(10_000),
      operator: 'o'.repeat(200),
      loggerId: 'l'.repeat(200),
      testedAt: '2026-11-02T09:00:00Z', // the generated log has elapsed time only
    });
    const million = drainLog(1_000_000);
    const big = await post(million, 'million.csv', { testedAt: '2026-11-03T09:00:00Z' });
    const total = (await (await fetch(`${base}/api/fleet?limit=1`, { headers: auth })).json())
      .total;
    const preview = await (
      await fetch(`${base}/api/exports`, { method: 'POST', headers: json, body: '{}' })
    ).json();
    // the first export also starts the task thread and fills the read cache
    for (let job = preview; job.state === 'running'; ) {
      await new Promise((r) => setTimeout(r, 200));
      job = await (await fetch(base + job.statusUrl, { headers: auth })).json();
    }
    console.log(
      `heavy case: demo loaded, server up in ${(startMs / 1000).toFixed(1)} s; ${total} outlets; export of every approved fit = ${preview.total} reports; 1 000 000-row log ${(million.length / 1e6).toFixed(1)} MB`,
    );

    // the same reads with nothing heavy running: what the shared machine gives at this moment.
    // autocannon in a thread of its own (workers: 1), so this process's big downloads below do not delay its clock
    const idleLoad = loadavg();
    const [idleHealth, idleFit] = await Promise.all([
      autocannon({
        url: `${base}/api/health`,
        connections: 2,
        overallRate: 100,
        duration: seconds,
        workers: 1,
      }),
      autocannon({
        url: `${base}/api/fits/${long.fit.id}`,
        headers: auth,
        connections: 2,
        overallRate: 100,
        duration: seconds,
        workers: 1,
      }),
    ]);
    console.log(
      `load average ${idleLoad.map((x) => x.toFixed(2)).join(' ')} (${availableParallelism()} cores)`,
    );
    report('GET /api/health, nothing heavy', idleHealth);
    report('GET /api/fits/:id, nothing heavy', idleFit);
    const until = performance.now() + seconds * 1000;
    const counts = { pdfBytes: 0, zipBytes: 0, seriesBytes: 0 };
    const loadBefore = loadavg();
    const [health, fitReads, pdfs, exports, series] = await Promise.all([
      autocannon({
        url: `${base}/api/health`,
        connections: 2,
        overallRate: 100,
        duration: seconds,
        workers: 1,
      }),
      autocannon({
        url: `${base}/api/fits/${long.fit.id}`,
        headers: auth,
        connections: 2,
        overallRate: 100,
        duration: seconds,
        workers: 1,
      }),
      repeat(until, async () => {
        counts.pdfBytes = (
          await (
            await fetch(`${base}/api/fits/${long.fit.id}/report.pdf`, { headers: auth })
          ).arrayBuffer()
        ).byteLength;
      }),
      repeat(until, async () => {
        let job = await (
          await fetch(`${base}/api/exports`, { method: 'POST', headers: json, body: '{}' })
        ).json();
        while (job.state === 'running') {
          await new Promise((r) => setTimeout(r, 200));
          job = await (await fetch(base + job.statusUrl, { headers: auth })).json();
        }
        if (job.state !== 'done') throw new Error(`export ${job.state}: ${job.error}`);
        counts.zipBytes = (
          await (await fetch(base + job.archiveUrl, { headers: auth })).arrayBuffer()
        ).byteLength;
      }),
      repeat(until, async () => {
        counts.seriesBytes = (
          await (
            await fetch(`${base}/api/tests/${big.test.id}/series`, { headers: auth })
          ).arrayBuffer()
        ).byteLength;
      }),
    ]);
    const loadAfter = loadavg();
    const fmt = (xs: number[]) =>
      `${xs.length} made, ${xs.map((x) => (x / 1000).toFixed(1)).join(' / ')} s each`;
    console.log(
      `load average before ${loadBefore.map((x) => x.toFixed(2)).join(' ')}, after ${loadAfter.map((x) => x.toFixed(2)).join(' ')} (${availableParallelism()} cores)`,
    );
    report('GET /api/health during heavy work', health);
    report('GET /api/fits/:id during heavy work', fitReads);
    console.log(
      `  PDF (10 000-character note, ${(counts.pdfBytes / 1024).toFixed(0)} KiB): ${fmt(pdfs)}`,
    );
    console.log(
      `  export of every approved fit (${preview.total} reports, ${(counts.zipBytes / 1e6).toFixed(1)} MB zip): ${fmt(exports)}`,
    );
    console.log(
      `  series of the 1 000 000-row log (${(counts.seriesBytes / 1e6).toFixed(1)} MB JSON): ${fmt(series)}`,
    );
  } finally {
    child.kill('SIGTERM');
  }
}

if (which === 'all' || which === 'throughput') await throughput();
if (which === 'all' || which === 'heavy') await heavy();
if (which === 'all' || which === 'engines') await import('./http-engines.js');
