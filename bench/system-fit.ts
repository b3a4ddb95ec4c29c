/**
 * The joint fit of connected vessels against the number of readings (the service's cap,
 * MAX_FIT_SAMPLES in server/jobs/system-fit.ts): the invented rinse cascade (sample-data/systems,
 * 3 vessels, 1 s readings) with each log made k times denser by linear interpolation between its
 * readings (the same drain, more readings). Run: npx tsx bench/system-fit.ts [k …]
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { systemFitAnswer } from '../server/jobs/system-fit.js';

const dir = fileURLToPath(new URL('../sample-data/systems/', import.meta.url));
const file = (name: string) => ({ bytes: readFileSync(dir + name), fileName: name });

/** The log's data lines k times denser: k−1 readings interpolated between each pair. */
function denser(name: string, k: number) {
  const lines = readFileSync(dir + name, 'utf8').split('\n');
  const header = lines.findIndex((l) => l.startsWith('timestamp'));
  const rows = lines
    .slice(header + 1)
    .filter((l) => l.trim() !== '')
    .map((l) => l.split(','));
  const out = lines.slice(0, header + 1);
  for (let i = 0; i < rows.length; i++) {
    const [t, y] = [Date.parse(rows[i][0]), Number(rows[i][1])];
    out.push(`${new Date(t).toISOString()},${y.toFixed(5)}`);
    if (i + 1 === rows.length) break;
    const [t2, y2] = [Date.parse(rows[i + 1][0]), Number(rows[i + 1][1])];
    for (let j = 1; j < k; j++)
      out.push(
        `${new Date(t + ((t2 - t) * j) / k).toISOString()},${(y + ((y2 - y) * j) / k).toFixed(5)}`,
      );
  }
  return { bytes: Buffer.from(out.join('\n') + '\n'), fileName: name };
}

const system = file('rinse-cascade.system.json');
const logs = { RC1: 'rc1-2026-04-08.csv', RC2: 'rc2-2026-04-08.csv', SW3: 'sw3-2026-04-08.csv' };
systemFitAnswer({
  system,
  logs: Object.entries(logs).map(([id, n]) => [id, file(n)]),
  flows: [],
  fields: {},
}); // warm-up
for (const k of process.argv
  .slice(2)
  .map(Number)
  .filter((x) => x > 0)
  .concat(process.argv.length > 2 ? [] : [1, 4, 16])) {
  const input = {
    system,
    logs: Object.entries(logs).map(
      ([id, n]) => [id, denser(n, k)] as [string, { bytes: Buffer; fileName: string }],
    ),
    flows: [],
    fields: {},
  };
  const t0 = performance.now();
  const r = systemFitAnswer(input) as {
    readings?: number;
    outlets: Record<string, { effectiveAreaM2: { value: number } }>;
  };
  const ms = performance.now() - t0;
  const n = input.logs.reduce((s, [, f]) => s + f.bytes.toString().split('\n').length, 0);
  console.log(
    `×${k}: about ${n} readings, ${ms.toFixed(0)} ms (${((1000 * ms) / n).toFixed(1)} µs per reading); Cd·a RC1 ${r.outlets.RC1.effectiveAreaM2.value.toExponential(5)} m²`,
  );
}
