/**
 * Tests left pending by an earlier run are analysed after the server listens, in the background;
 * one that fails is noted and the others go on.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { VESSEL_FILE } from '../http/helpers.js';
import { envFor, serve, stop, type Served } from './serve-process.js';
import { openTestStore } from '../support/store.js';

const base = mkdtempSync(join(tmpdir(), 'efflux-resume-'));
const dataDir = join(base, 'data');
const gate = join(base, 'gate');
const running: Served[] = [];
afterAll(() => running.forEach((s) => s.child.exitCode === null && s.child.kill('SIGKILL')));

describe('resume after a restart', () => {
  it('runs after listen; a failing test is noted and the next ones are analysed', async () => {
    // an earlier run stored three uploads and stopped before analysing them
    const store = await openTestStore({ dataDir });
    const token = (await store.users.createToken(SYSTEM_ACTOR, 'admin', 'admin')).token;
    const v = await store.vessels.create(SYSTEM_ACTOR, VESSEL_FILE as never);
    const put = async (name: string, body: string) =>
      (
        await store.tests.createPending(SYSTEM_ACTOR, {
          vesselId: v.id,
          outletId: null,
          log: { bytes: Buffer.from(body), fileName: name },
          settings: {},
        })
      ).id;
    const failing = await put('fail.csv', 't,level\nFAIL\n0,2\n1,1.9\n');
    const gated = await put('gate.csv', 't,level\nGATE\n0,2\n1,1.9\n');
    const plain = await put('plain.csv', 't,level\n0,2\n1,1.8\n');
    await store.close();

    const s = await serve(
      envFor(dataDir, {
        EFFLUX_ANALYZE_MODULE: new URL('./gated-analyze.ts', import.meta.url).href,
        EFFLUX_TEST_GATE: gate,
      }),
    );
    running.push(s);
    const auth = { authorization: `Bearer ${token}` };
    const get = async (id: number) =>
      (await fetch(`${s.base}/api/tests/${id}`, { headers: auth })).json();

    // listening while the resume is held at the gated test: the service answers meanwhile
    expect((await fetch(`${s.base}/api/health`)).status).toBe(200);
    expect((await get(gated)).status).toBe('pending');
    let f = await get(failing);
    while (f.failedAttempts === 0) {
      await new Promise((r) => setTimeout(r, 50));
      f = await get(failing);
    }
    expect(f).toMatchObject({
      status: 'pending',
      failedAttempts: 1,
      lastFailure: 'the stand-in engine failed on purpose',
      stuck: false,
    });

    writeFileSync(gate, '');
    while (!/pending tests from an earlier run/.test(s.out()))
      await new Promise((r) => setTimeout(r, 50));
    expect(s.out()).toMatch(
      /pending tests from an earlier run: 2 analysed, 0 refused and withdrawn, 1 failed again\n/,
    );
    expect((await get(gated)).status).toBe('analysed');
    expect((await get(plain)).status).toBe('analysed');
    expect(await stop(s)).toBe(0);
  }, 90_000);
});
