import { describe, expect, it } from 'vitest';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadStrdDirectory, runStrd } from '../../server/reference/nist/run.js';
import type { StrdRun } from '../../server/reference/nist/run.js';

// Source: NIST Statistical Reference Datasets, nonlinear regression, certified values
// (../shared/reference/nist-strd). LRE = −log10(|est − cert|/|cert|), capped at the certified digits.
const dir = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/reference/nist-strd');
const datasets = loadStrdDirectory(dir);

// Lanczos1's certified residual sum of squares (1.43e-25) is at the rounding level of its data:
// with the 13-digit responses rounded to binary doubles, the exact minimum of the sum of squares
// (found in 50-digit arithmetic, outside this project) is 1.42955e-25, an LRE of 3.06 against the
// certified value, so no double-precision fit can reach LRE 4 on its standard errors (which scale
// with sqrt(SSR)). Its estimates are held to the full bar; its SSR and standard errors to what the
// rounded data allow.
const ROUNDING_LIMITED = new Set(['Lanczos1']);

describe('NIST StRD nonlinear regression, both starts', () => {
  it('has the 27 datasets', () => expect(datasets.length).toBe(27));
  const runs: StrdRun[] = [];
  for (const ds of datasets) {
    for (const start of [1, 2] as const) {
      it(`${ds.name} from start ${start}`, () => {
        const run = runStrd(ds, start);
        runs.push(run);
        expect(run.converged).toBe(true);
        for (const lre of run.estimateLre) expect(lre).toBeGreaterThanOrEqual(6);
        const seBar = ROUNDING_LIMITED.has(ds.name) ? 3 : 4;
        const rssBar = ROUNDING_LIMITED.has(ds.name) ? 2.5 : 6;
        for (const lre of run.standardErrorLre) expect(lre).toBeGreaterThanOrEqual(seBar);
        expect(run.rssLre).toBeGreaterThanOrEqual(rssBar);
      });
    }
  }
  it('reports the total time (measured, not asserted)', () => {
    const total = runs.reduce((s, r) => s + r.ms, 0);
    process.stdout.write(`NIST StRD: ${runs.length} runs, ${total.toFixed(0)} ms in the solver\n`);
    expect(runs.length).toBe(54);
  });
});
