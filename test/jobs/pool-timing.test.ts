import { afterAll, describe, expect, it } from 'vitest';
import { createAnalysisPool, type RunTiming } from '../../server/jobs/pool.js';
import { warmUpRequest } from '../../server/jobs/warm-up.js';

const fake = new URL('../http/fake-analyze.ts', import.meta.url).href;
const pool = createAnalysisPool({ threads: 1, analyzeModule: fake });
afterAll(() => pool.close());

describe('analysis pool: hand-over and timing', () => {
  it('moves bytes that own their buffer to the worker, copies a slice of a larger buffer, and reports its times', async () => {
    const own = new TextEncoder().encode('t,level\n0,1\n1,0.9\n');
    const timing: RunTiming = {};
    const out = await pool.run(
      { log: { bytes: own, fileName: 'a.csv' }, vessel: { name: 'x' }, settings: {} },
      timing,
    );
    expect(out.fit.engineVersion).toBe('fake-1');
    expect(own.byteLength).toBe(0); // transferred, not copied
    expect(timing.engineMs).toBeGreaterThanOrEqual(0);
    expect(timing.poolMs).toBeGreaterThanOrEqual(timing.engineMs!);
    const big = new TextEncoder().encode('xxt,level\n0,1\n1,0.9\n');
    const before = big.byteLength;
    const slice = big.subarray(2);
    await pool.run({
      log: { bytes: slice, fileName: 'b.csv' },
      vessel: { name: 'x' },
      settings: {},
    });
    expect(big.byteLength).toBe(before); // a view into a buffer it does not fill is left alone
  });

  it('warms up only for the real engine (a stand-in module is not given the built-in drain)', async () => {
    expect(await pool.warm).toBeNull();
  });

  it('the built-in warm-up drain is a readable log with a vessel file', () => {
    const r = warmUpRequest();
    const lines = new TextDecoder().decode(r.log.bytes).trim().split('\n');
    expect(lines[0]).toBe('time_s,level_m');
    expect(lines.length).toBe(3001);
    const level = lines.slice(1).map((l) => Number(l.split(',')[1]));
    expect(level[0]).toBeGreaterThan(level[level.length - 1]); // it drains
  });
});
