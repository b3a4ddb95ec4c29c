/**
 * The invented demo never enters a real site's history by default: `serve` on a new folder starts
 * empty; `--demo` fills an empty folder and marks it (database, health answer, banner); `--demo`
 * on a folder with real records is refused with exit 2.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { VESSEL_FILE } from '../http/helpers.js';
import { eff, envFor, serve, stop, type Served } from './serve-process.js';
import { openTestStore } from '../support/store.js';

const base = mkdtempSync(join(tmpdir(), 'efflux-demo-'));
const running: Served[] = [];
afterAll(() => running.forEach((s) => s.child.exitCode === null && s.child.kill('SIGKILL')));

describe('demo apart from real data', () => {
  it('serve --data on a new folder starts empty and says it is not the demo', async () => {
    const s = await serve(envFor('', { EFFLUX_DATA_DIR: '', EFFLUX_DEMO: '' }), [
      '--data',
      join(base, 'real'),
    ]); // no demo setting at all: the default
    running.push(s);
    expect(s.out()).toContain(`(data in ${join(base, 'real')})`);
    expect(await (await fetch(`${s.base}/api/health`)).json()).toEqual({
      status: 'ok',
      demo: false,
    });
    const vessels = await (
      await fetch(`${s.base}/api/vessels`, { headers: { authorization: `Bearer ${s.token}` } })
    ).json();
    expect(vessels.total).toBe(0);
    expect(await stop(s)).toBe(0);
  }, 60_000);

  it('--demo on an empty folder loads the scenario and marks the folder as the demo', async () => {
    const dir = join(base, 'demo');
    const s = await serve(envFor(dir), ['--demo']);
    running.push(s);
    expect(s.out()).toMatch(/DEMO data, invented/);
    expect(await (await fetch(`${s.base}/api/health`)).json()).toEqual({
      status: 'ok',
      demo: true,
    });
    const vessels = await (
      await fetch(`${s.base}/api/vessels`, { headers: { authorization: `Bearer ${s.token}` } })
    ).json();
    expect(vessels.total).toBeGreaterThan(0);
    expect(await stop(s)).toBe(0);
    const store = await openTestStore({ dataDir: dir });
    expect(await store.meta.isDemo()).toBe(true);
    expect(await store.audit.list({ action: 'service.mark-demo' })).toHaveLength(1);
    await store.close();
  }, 120_000);

  it('--demo on a folder holding real records is refused with exit 2, and nothing is added', async () => {
    const dir = join(base, 'site');
    const store = await openTestStore({ dataDir: dir });
    await store.vessels.create(SYSTEM_ACTOR, VESSEL_FILE as never);
    const entries = (await store.audit.verify()).count;
    await store.close();
    const r = await eff(['serve', '--demo', '--data', dir], envFor(dir));
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      `efflux: the data folder ${dir} holds real records (1 vessel, 0 tests): the invented demo is loaded only into an empty folder; run the demo in its own (npm start uses ./data-demo)`,
    );
    const after = await openTestStore({ dataDir: dir });
    expect(await after.meta.isDemo()).toBe(false);
    expect(await after.vessels.count()).toBe(1);
    expect((await after.audit.verify()).count).toBe(entries);
    await after.close();
  }, 60_000);
});
