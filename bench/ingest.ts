/**
 * Reading speed and memory of the logger reader on a generated 1 000 000-row log (invented
 * data). Run: npx tsx bench/ingest.ts [rows] [iso|dmy|quoted]; RUNS=n repeats the read.
 * iso: ISO timestamps with Z, level in cm, temperature; dmy: day-first local times with a
 * decimal comma; quoted: every field in quotes (the papaparse path).
 */
import { readLevelLog } from '../server/core/ingest/read-log.js';

const rows = Number(process.argv[2] ?? 1_000_000);
const layout = process.argv[3] ?? 'iso';

// Written line by line into one buffer, so generating adds no garbage to the peak RSS.
function generate(n: number): Uint8Array {
  const enc = new TextEncoder();
  const buf = new Uint8Array(n * 48 + 64);
  const header =
    layout === 'iso'
      ? 'timestamp,level [cm],temp [°C]\n'
      : layout === 'quoted'
        ? '"timestamp","level [cm]"\n'
        : 'Time;Level (mm)\n';
  let at = enc.encodeInto(header, buf).written;
  const t0 = Date.UTC(2026, 3, 20, 6, 0, 0);
  for (let i = 0; i < n; i++) {
    const h = 350 * (1 - i / (1.2 * n)) ** 2 + 0.05 * Math.sin(i / 7);
    const t = new Date(t0 + i * 100).toISOString();
    const line =
      layout === 'iso'
        ? `${t},${h.toFixed(3)},${(14 + i / n).toFixed(2)}\n`
        : layout === 'quoted'
          ? `"${t}","${h.toFixed(3)}"\n`
          : `${t.slice(8, 10)}.${t.slice(5, 7)}.${t.slice(0, 4)} ${t.slice(11, 23)};${(h * 10).toFixed(1).replace('.', ',')}\n`;
    at += enc.encodeInto(line, buf.subarray(at)).written;
  }
  return buf.slice(0, at);
}

const bytes = generate(rows);
const mb = bytes.length / 1e6;
const rssBefore = process.memoryUsage().rss;
const runs: number[] = [];
let n = 0;
for (let k = 0; k < Number(process.env.RUNS ?? 3); k++) {
  const t = performance.now();
  const s = readLevelLog(bytes, 'bench.csv', {});
  runs.push(performance.now() - t);
  n = s.timeS.length;
}
const best = Math.min(...runs);
const peak = process.resourceUsage().maxRSS / 1024;
console.log(`layout ${layout}: ${n} rows, ${mb.toFixed(1)} MB`);
console.log(
  `read: best ${best.toFixed(0)} ms of ${runs.map((r) => r.toFixed(0)).join('/')} ms, ${(mb / (best / 1000)).toFixed(0)} MB/s`,
);
console.log(
  `RSS before reading ${(rssBefore / 1048576).toFixed(0)} MiB (holds the file), peak ${peak.toFixed(0)} MiB; file ${(bytes.length / 1048576).toFixed(0)} MiB`,
);
