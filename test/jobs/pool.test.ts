import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../server/core/errors.js';
import { createAnalysisPool } from '../../server/jobs/pool.js';
import { EngineUnavailableError } from '../../server/jobs/worker-reply.js';

const fake = new URL('../http/fake-analyze.ts', import.meta.url).href;
const pool = createAnalysisPool({ threads: 1, analyzeModule: fake });
afterAll(() => pool.close());

const req = (text: string) => ({
  log: { bytes: new TextEncoder().encode(text), fileName: 'w.csv' },
  vessel: { name: 'x' },
  settings: {},
});

describe('analysis pool', () => {
  it('runs the analysis in a worker thread', async () => {
    const out = await pool.run(req('t,level\n0,1\n1,0.9\n'));
    expect(out.fit.engineVersion).toBe('fake-1');
  });

  it('an InputError crosses the worker boundary with its file, line and field', async () => {
    const e = await pool.run(req('t,level\n0,1\n1,x\n')).catch((x) => x);
    expect(e).toBeInstanceOf(InputError);
    expect(e).toMatchObject({
      message: '"x" is not a number',
      file: 'w.csv',
      line: 3,
      field: 'level',
    });
  });

  it('a missing engine is reported as such', async () => {
    const p = createAnalysisPool({
      threads: 1,
      analyzeModule: new URL('./no-such-engine.js', import.meta.url).href,
    });
    const e = await p.run(req('t,level\n0,1\n1,0.9\n')).catch((x) => x);
    await p.close();
    expect(e).toBeInstanceOf(EngineUnavailableError);
  });
});
