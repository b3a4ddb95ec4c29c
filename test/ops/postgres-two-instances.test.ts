/**
 * Two real `efflux serve` processes on one PostgreSQL database, the real engine: 50 uploads of a
 * demo log (stated testedAt, allowDuplicate so each is a test of its own) sent at once, split
 * between them, and one instance killed (SIGKILL) midway. Afterwards, with the killed one started
 * again and the pending work claimed: every upload answered 201 is stored exactly once, no test
 * has more than one fit (none analysed twice), every stored test is analysed, and the audit chain
 * and the stored copies verify (`efflux audit verify` on the database). A session opened on one
 * instance is valid on the other, and a fit approved on one reads approved on the other at once.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openStore, SYSTEM_ACTOR } from '../../server/store/index.js';
import { createMigratedTestDatabase, type TestDatabase } from '../support/postgres.js';
import { eff, envFor, serve, type Served } from './serve-process.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const LOG = readFileSync(join(root, 'sample-data/fb1-2026-03-10-preamble.csv'));
const VESSEL = JSON.parse(
  readFileSync(join(root, 'sample-data/backwash-tank-fb1.vessel.json'), 'utf8'),
);
const TESTED_AT = '2026-03-10T08:15:00Z'; // as the demo manifest states for this log
const UPLOADS = 50;

let db: TestDatabase;
let env: NodeJS.ProcessEnv;
let adminToken: string;
let engineerToken: string;
let vesselId: number;
const running: Served[] = [];

beforeAll(async () => {
  db = await createMigratedTestDatabase();
  const store = await openStore({ databaseUrl: db.url, poolSize: 2 });
  adminToken = (await store.users.createToken(SYSTEM_ACTOR, 'admin', 'admin')).token;
  engineerToken = (await store.users.createToken(SYSTEM_ACTOR, 'reviewing engineer', 'engineer'))
    .token;
  vesselId = (await store.vessels.create(SYSTEM_ACTOR, VESSEL)).id;
  await store.close();
  env = envFor(mkdtempSync(join(tmpdir(), 'efflux-two-')), {
    EFFLUX_DATABASE_URL: db.url,
    EFFLUX_WORKERS: '1',
  });
  delete env.EFFLUX_ANALYZE_MODULE; // the real engine
}, 60_000);

afterAll(async () => {
  for (const s of running) if (s.child.exitCode === null) s.child.kill('SIGKILL');
  await Promise.all(running.map((s) => s.exited));
  await db?.drop();
});

function upload(base: string, i: number): Promise<{ status: number; testId?: number }> {
  const form = new FormData();
  form.set('log', new Blob([LOG]), `fb1-upload-${i}.csv`);
  form.set('testedAt', TESTED_AT);
  form.set('allowDuplicate', 'true');
  form.set('notes', `upload ${i} of ${UPLOADS}`);
  return fetch(`${base}/api/vessels/${vesselId}/tests`, {
    method: 'POST',
    body: form,
    headers: { authorization: `Bearer ${adminToken}` },
  }).then(
    async (r) => {
      const body = r.status === 201 ? await r.json() : await r.text();
      return {
        status: r.status,
        testId: r.status === 201 ? Number(body.test?.id ?? body.testId) : undefined,
      };
    },
    () => ({ status: 0 }), // the connection died with the killed instance
  );
}

async function until(what: string, test: () => Promise<boolean>, ms = 120_000): Promise<void> {
  const end = Date.now() + ms;
  while (!(await test())) {
    if (Date.now() > end) throw new Error(`still waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

describe('two instances on one PostgreSQL database', () => {
  let a: Served;
  let b: Served;

  it('50 uploads split between two instances, one killed midway: each answered upload once, none analysed twice, the chain intact', async () => {
    [a, b] = await Promise.all([serve(env), serve(env)]);
    running.push(a, b);
    let answeredByA = 0;
    let killed = false;
    const sent = Array.from({ length: UPLOADS }, (_, i) => {
      const onA = i % 2 === 0;
      return upload(onA ? a.base : b.base, i).then((r) => {
        // midway: after A's third answer, while most of its uploads are still in flight
        if (onA && ++answeredByA === 3 && !killed) {
          killed = true;
          a.child.kill('SIGKILL');
        }
        return { ...r, onA };
      });
    });
    const results = await Promise.all(sent);
    const statuses = (rs: typeof results) => rs.map((r) => r.status).join(' ');
    expect(killed).toBe(true);
    const fromA = results.filter((r) => r.onA);
    const fromB = results.filter((r) => !r.onA);
    expect(fromA.filter((r) => r.status === 0).length, statuses(fromA)).toBeGreaterThan(0);
    // B answered each of its own: 201, or 503 when the analysis ran past its time limit on a
    // loaded machine (the test stays stored, pending, and is analysed later); A the same, or the
    // connection died with it
    expect(fromB.filter((r) => r.status === 201).length, statuses(fromB)).toBeGreaterThan(0);
    for (const r of fromB) expect([201, 503], statuses(fromB)).toContain(r.status);
    for (const r of fromA) expect([0, 201, 503], statuses(fromA)).toContain(r.status);

    // the killed instance starts again and claims what was left pending
    const a2 = await serve(env);
    running.push(a2);
    a = a2;

    const store = await openStore({ databaseUrl: db.url, poolSize: 2 });
    try {
      await until(
        'every stored test to be analysed',
        async () =>
          Number(
            await store.sql.value("SELECT count(*) FROM drain_tests WHERE status = 'pending'"),
          ) === 0,
      );
      const answered = results.filter((r) => r.status === 201).map((r) => r.testId!);
      expect(new Set(answered).size).toBe(answered.length);
      const stored = await store.sql.all<{ id: number; notes: string }>(
        'SELECT id, notes FROM drain_tests ORDER BY id',
      );
      for (const id of answered) expect(stored.filter((t) => Number(t.id) === id)).toHaveLength(1);
      // an upload is stored once or not at all: no two tests carry one upload's note
      const notes = stored.map((t) => t.notes);
      expect(new Set(notes).size).toBe(notes.length);
      // no test analysed twice: one fit per stored test, none without
      const perTest = await store.sql.all<{ test_id: number; n: number }>(
        'SELECT t.id AS test_id, count(f.id) AS n FROM drain_tests t LEFT JOIN fits f ON f.test_id = t.id GROUP BY t.id',
      );
      expect(perTest.length).toBe(stored.length);
      expect(perTest.filter((r) => Number(r.n) !== 1)).toEqual([]);
      expect((await store.audit.verify()).ok).toBe(true);
    } finally {
      await store.close();
    }
    const verify = await eff(['audit', 'verify'], env);
    expect(verify.stdout).toMatch(/^audit chain intact: \d+ entries/);
    expect(verify.code).toBe(0);
  }, 300_000);

  it('a session opened on one instance is valid on the other', async () => {
    const signIn = await fetch(`${b.base}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ token: engineerToken }),
    });
    expect(signIn.status).toBe(201);
    const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
    const who = await fetch(`${a.base}/api/session`, { headers: { cookie } });
    expect(who.status).toBe(200);
    expect((await who.json()).user.name).toBe('reviewing engineer');
  }, 60_000);

  it('a fit approved on one instance reads approved on the other straight after', async () => {
    const auth = { authorization: `Bearer ${engineerToken}` };
    const store = await openStore({ databaseUrl: db.url, poolSize: 1 });
    const fitId = Number(await store.sql.value("SELECT min(id) FROM fits WHERE status = 'draft'"));
    await store.close();
    // read on B first, so B holds the draft in whatever it caches
    const before = await (await fetch(`${b.base}/api/fits/${fitId}`, { headers: auth })).json();
    expect(before.status).toBe('draft');
    const review = await fetch(`${a.base}/api/fits/${fitId}/review`, {
      method: 'POST',
      headers: { ...auth, 'content-type': 'application/json' },
      body: JSON.stringify({ decision: 'approve', comment: 'checked against the tank drawing' }),
    });
    expect(review.status).toBe(200);
    const after = await (await fetch(`${b.base}/api/fits/${fitId}`, { headers: auth })).json();
    expect(after.status).toBe('approved');
  }, 60_000);
});
