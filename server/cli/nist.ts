/**
 * `node dist/server/cli/nist.js [--json] [--dir PATH]`: fit all NIST StRD nonlinear-regression
 * datasets from both starts and print the agreement with the certified values (LRE), as a table
 * or as JSON. Folder: --dir, else the committed copy test/reference/nist-strd in the project.
 */
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { isInputError } from '../core/errors.js';
import { loadStrdDirectory, runAllStrd } from '../reference/nist/run.js';
import type { StrdRun } from '../reference/nist/run.js';

/** The project root: the nearest folder above this module holding package.json. */
function projectRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    if (existsSync(join(dir, 'package.json'))) return dir;
    const up = dirname(dir);
    if (up === dir) return process.cwd();
    dir = up;
  }
}

function table(runs: StrdRun[], totalMs: number): string {
  const head = ['dataset', 'start', 'LRE est', 'LRE se', 'LRE rss', 'iter', 'ms', 'stop'];
  const rows = runs.map((r) => [
    r.dataset,
    String(r.start),
    Math.min(...r.estimateLre).toFixed(1),
    Math.min(...r.standardErrorLre).toFixed(1),
    r.rssLre.toFixed(1),
    String(r.iterations),
    r.ms.toFixed(1),
    r.converged ? r.stopReason : `${r.stopReason} (not converged)`,
  ]);
  const widths = head.map((h, k) => Math.max(h.length, ...rows.map((row) => row[k].length)));
  const fmt = (row: string[]): string =>
    row
      .map((c, k) => (k === 0 || k === 7 ? c.padEnd(widths[k]) : c.padStart(widths[k])))
      .join('  ');
  const minEst = Math.min(...runs.map((r) => Math.min(...r.estimateLre)));
  const minSe = Math.min(...runs.map((r) => Math.min(...r.standardErrorLre)));
  const minRss = Math.min(...runs.map((r) => r.rssLre));
  const lines = [fmt(head), ...rows.map(fmt)];
  lines.push(
    `total: ${runs.length} runs, ${runs.filter((r) => r.converged).length} converged, min LRE estimates ${minEst.toFixed(1)}, min LRE standard errors ${minSe.toFixed(1)}, min LRE rss ${minRss.toFixed(1)}, ${totalMs.toFixed(0)} ms`,
  );
  return lines.join('\n');
}

const USAGE = `usage: npm run nist -- [--json] [--dir PATH]

Fits every NIST StRD nonlinear-regression dataset from both starts and prints the agreement with
the certified values (LRE), as a table or (--json) as JSON.
  --dir PATH   the folder of StRD .dat files
The folder is --dir if given, else the project's committed copy, test/reference/nist-strd.
`;

export function main(argv: string[]): number {
  let json = false;
  let dir = resolve(projectRoot(), 'test', 'reference', 'nist-strd');
  let from = 'the default, the committed copy in the project';
  for (let k = 0; k < argv.length; k++) {
    if (argv[k] === '--json') json = true;
    else if (argv[k] === '--help' || argv[k] === '-h') {
      process.stdout.write(USAGE);
      return 0;
    } else if (argv[k] === '--dir' && argv[k + 1] !== undefined) {
      dir = resolve(argv[++k]);
      from = '--dir';
    } else {
      process.stderr.write(`nist: unknown argument ${argv[k]}\n${USAGE}`);
      return 2;
    }
  }
  if (!existsSync(dir)) {
    process.stderr.write(
      `nist: no StRD folder at ${dir} (from ${from}); give --dir PATH to a folder of StRD .dat files\n`,
    );
    return 2;
  }
  try {
    const datasets = loadStrdDirectory(dir);
    const t0 = performance.now();
    const runs = runAllStrd(datasets);
    const total = performance.now() - t0;
    if (json) {
      const out = runs.map((r) => ({
        dataset: r.dataset,
        start: r.start,
        estimates: r.estimates,
        standardErrors: r.standardErrors,
        converged: r.converged,
        iterations: r.iterations,
        ms: r.ms,
      }));
      process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    } else {
      process.stdout.write(`${table(runs, total)}\n`);
    }
    return 0;
  } catch (e) {
    if (isInputError(e)) {
      process.stderr.write(`nist: ${e.toLine()}\n`);
      return 2;
    }
    throw e;
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  process.exitCode = main(process.argv.slice(2));
}
