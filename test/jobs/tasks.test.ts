/** The task pool (server/jobs/tasks.ts): errors cross the thread boundary whole, a time limit abandons the task. */
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../server/core/errors.js';
import { createTaskPool, TaskTimeoutError } from '../../server/jobs/tasks.js';

const badSystem = {
  system: { bytes: new TextEncoder().encode('{ not json'), fileName: 'broken.system.json' },
  logs: [],
  flows: [],
  fields: {},
};
const pools: { close(): Promise<void> }[] = [];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.close()));
});

describe('task pool', () => {
  it('answers an InputError from the thread with its file and line', async () => {
    const pool = createTaskPool({ threads: 1 });
    pools.push(pool);
    const e = await pool.run('system-fit', badSystem).catch((x) => x);
    expect(e).toBeInstanceOf(InputError);
    expect(e.file).toBe('broken.system.json');
    expect(e.line).toBe(1);
  }, 60_000);

  it('abandons a task past its limit with TaskTimeoutError naming the kind and the limit', async () => {
    const pool = createTaskPool({ threads: 1, timeoutMs: { 'system-fit': 1 } });
    pools.push(pool);
    const e = await pool.run('system-fit', badSystem).catch((x) => x);
    expect(e).toBeInstanceOf(TaskTimeoutError);
    expect(e.message).toBe(
      'the joint fit of the connected vessels did not finish within 0.001 s; try again later or ask for less',
    );
  }, 60_000);
});
