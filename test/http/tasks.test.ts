/**
 * Heavy work off the event loop (server/jobs/tasks.ts): past its time limit a report, a series or a
 * joint fit answers 503 problem+json and nothing is written; a period export runs as a job with
 * progress and a downloadable zip; and with a real listening server, /api/health answers while a
 * long report is being rendered (the order of the answers, not a time, is checked).
 */
import { readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEXT_LIMITS } from '../../server/core/limits.js';
import { buildApp } from '../../server/http/app.js';
import { createTaskPool, type TaskPool, type TaskRunner } from '../../server/jobs/tasks.js';
import { readZip } from '../../server/render/zip.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { reportFixture, root } from '../render/report-fixture.js';
import { fakeAnalyze } from './fake-analyze.js';
import { multipart } from './helpers.js';

let store: Store;
let fitIds: number[];
let testId: number;
let token: string;
let otherToken: string;
let pool: TaskPool;
const auth = (t = token) => ({ authorization: `Bearer ${t}` });

/** Rows a request could have written. */
const counts = async () =>
  Object.fromEntries(
    await Promise.all(
      ['drain_tests', 'fits', 'audit_log', 'vessels', 'raw_files'].map(async (t) => [
        t,
        Number(await store.sql.value(`SELECT count(*) AS n FROM ${t}`)),
      ]),
    ),
  );

beforeAll(async () => {
  // the demo's invented backwash tank (sample-data/, fictional); the first test with the longest
  // fields a stored record may hold, and a 10 000-character unbroken word in its notes
  const fx = await reportFixture([
    {
      log: 'fb1-2026-03-10-preamble.csv',
      testedAt: '2026-03-10T08:15:00Z',
      operator: 'o'.repeat(TEXT_LIMITS.name),
      loggerId: 'l'.repeat(TEXT_LIMITS.name),
      notes: 'n'.repeat(TEXT_LIMITS.note),
    },
    { log: 'fb1-2026-03-26-leaking-inlet.csv', testedAt: '2026-03-26T09:00:00Z' },
  ]);
  ({ store, fitIds } = fx);
  testId = (await store.fits.get(fitIds[0])).testId;
  token = (await store.users.createToken(SYSTEM_ACTOR, 'auditor-tasks', 'auditor')).token;
  otherToken = (await store.users.createToken(SYSTEM_ACTOR, 'engineer-tasks', 'engineer')).token;
  pool = createTaskPool({ threads: 1 });
}, 120_000);
afterAll(async () => {
  await pool?.close();
  await store?.close();
});

describe('over its time limit', () => {
  it('a report, a series and a joint fit answer 503 problem+json and write nothing', async () => {
    const app = await buildApp({ store, analyze: fakeAnalyze, taskTimeoutMs: 1 });
    try {
      const before = await counts();
      for (const url of [`/api/fits/${fitIds[0]}/report.pdf`, `/api/tests/${testId}/series`]) {
        const res = await app.inject({ method: 'GET', url, headers: auth() });
        expect(res.statusCode, url).toBe(503);
        expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
        expect(res.headers['retry-after']).toBe('30');
        expect(res.json().type).toBe('urn:efflux:problem:over-time-limit');
        expect(res.json().detail).toMatch(/did not finish within 0\.001 s/);
      }
      const dir = `${root}/sample-data/systems/`;
      const body = multipart([
        {
          field: 'system',
          name: 'filter-chain.system.json',
          bytes: readFileSync(dir + 'filter-chain.system.json'),
        },
        { field: 'log:FT1', name: 'ft1.csv', bytes: readFileSync(dir + 'ft1-2026-04-07.csv') },
        { field: 'log:BT2', name: 'bt2.csv', bytes: readFileSync(dir + 'bt2-2026-04-07.csv') },
      ]);
      const fit = await app.inject({
        method: 'POST',
        url: '/api/systems/fit',
        headers: { ...auth(otherToken), ...body.headers },
        payload: body.payload,
      });
      expect(fit.statusCode).toBe(503);
      expect(fit.json().type).toBe('urn:efflux:problem:over-time-limit');
      expect(await counts()).toEqual(before);
    } finally {
      await app.close();
    }
  }, 60_000);

  it('an export whose reports run past their limit fails, keeps no zip, and says why', async () => {
    const app = await buildApp({ store, analyze: fakeAnalyze, taskTimeoutMs: 1 });
    try {
      const started = (
        await app.inject({ method: 'POST', url: '/api/exports', headers: auth(), payload: {} })
      ).json();
      let job = started;
      while (job.state === 'running') {
        await new Promise((r) => setTimeout(r, 20));
        job = (await app.inject({ method: 'GET', url: started.statusUrl, headers: auth() })).json();
      }
      expect(job.state).toBe('failed');
      expect(job.error).toMatch(/fit report did not finish within/);
      expect(job.archiveUrl).toBeNull();
      const zip = await app.inject({
        method: 'GET',
        url: `${started.statusUrl}/archive.zip`,
        headers: auth(),
      });
      expect(zip.statusCode).toBe(409);
      expect(zip.json().detail).toMatch(/the export failed/);
    } finally {
      await app.close();
    }
  }, 60_000);
});

describe('a period export as a job', () => {
  it('shows progress report by report, refuses the zip until done, and serves it to its owner only', async () => {
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    const seen: string[] = [];
    // the real pool, with the first report held back until the test has looked at the job
    const tasks: TaskRunner = async (kind, input, o) => {
      seen.push(kind);
      if (kind === 'fit-report-pdf' && seen.length === 1) await gate;
      return pool.run(kind, input, o);
    };
    const app = await buildApp({ store, analyze: fakeAnalyze, tasks });
    try {
      const res = await app.inject({
        method: 'POST',
        url: '/api/exports',
        headers: auth(),
        payload: { site: (await store.vessels.list(1, 0)).items[0].site },
      });
      expect(res.statusCode).toBe(202);
      const job = res.json();
      expect(job).toMatchObject({ state: 'running', done: 0, total: 2, archiveUrl: null });
      const early = await app.inject({
        method: 'GET',
        url: `/api/exports/${job.id}/archive.zip`,
        headers: auth(),
      });
      expect(early.statusCode).toBe(409);
      expect(early.json().detail).toBe('the export is not ready: 0 of 2 reports made');
      // another person's job is not found, not forbidden
      expect(
        (await app.inject({ method: 'GET', url: job.statusUrl, headers: auth(otherToken) }))
          .statusCode,
      ).toBe(404);
      release();
      const progress: number[] = [];
      let now = job;
      while (now.state === 'running') {
        await new Promise((r) => setTimeout(r, 10));
        now = (await app.inject({ method: 'GET', url: job.statusUrl, headers: auth() })).json();
        progress.push(now.done);
      }
      expect(now).toMatchObject({
        state: 'done',
        done: 2,
        total: 2,
        error: null,
        archiveUrl: `/api/exports/${job.id}/archive.zip`,
      });
      expect(progress).toEqual([...progress].sort((a, b) => a - b)); // never goes back
      expect(seen).toEqual(['fit-report-pdf', 'fit-report-pdf', 'zip']);
      const zip = await app.inject({ method: 'GET', url: now.archiveUrl, headers: auth() });
      expect(zip.statusCode).toBe(200);
      const names = readZip(zip.rawPayload).map((e) => e.name);
      expect(names.filter((n) => n.startsWith('reports/'))).toHaveLength(2);
      expect(names).toEqual(
        expect.arrayContaining([
          'summary.csv',
          'audit-excerpt.jsonl',
          'manifest.json',
          'SHA256SUMS',
        ]),
      );
      expect(
        (await app.inject({ method: 'GET', url: now.archiveUrl, headers: auth(otherToken) }))
          .statusCode,
      ).toBe(404);
      // nothing matching: refused at once, no job
      const none = await app.inject({
        method: 'POST',
        url: '/api/exports',
        headers: auth(),
        payload: { from: '2020-01-01', to: '2020-01-02' },
      });
      expect(none.statusCode).toBe(422);
    } finally {
      await app.close();
    }
  }, 120_000);
});

describe('series of a stored log', () => {
  it('is read in the task thread from the database file, the same as from the bytes', async () => {
    const app = await buildApp({ store, analyze: fakeAnalyze, tasks: pool.run });
    try {
      const res = await app.inject({
        method: 'GET',
        url: `/api/tests/${testId}/series`,
        headers: auth(),
      });
      expect(res.statusCode).toBe(200);
      const { series, detected } = res.json();
      const { seriesAnswer } = await import('../../server/jobs/workbench-read.js');
      const t = await store.tests.get(testId);
      const fit = await store.fits.get(fitIds[0]);
      const fromBytes = JSON.parse(
        new TextDecoder().decode(
          await seriesAnswer({
            log: { bytes: await store.tests.rawBytes(t.sha256), fileName: t.fileName },
            vessel: fit.vessel,
            vesselFileName: 'v',
            settings: t.settings,
          }),
        ),
      );
      expect(series.timeS.length).toBeGreaterThan(100);
      expect(series).toEqual(fromBytes.series);
      expect(detected).toEqual(fromBytes.detected);
    } finally {
      await app.close();
    }
  }, 60_000);
});

describe('with a real listening server', () => {
  it('answers /api/health while a report with the longest fields is rendered, before the report', async () => {
    const app = await buildApp({ store, analyze: fakeAnalyze, tasks: pool.run });
    let received!: () => void;
    const pdfStarted = new Promise<void>((r) => (received = r));
    // health is asked once the server is working on the report
    app.addHook('preHandler', async (request) => {
      if (request.url.endsWith('/report.pdf')) setImmediate(received);
    });
    await app.listen({ host: '127.0.0.1', port: 0 });
    try {
      const base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
      const order: string[] = [];
      const pdf = fetch(`${base}/api/fits/${fitIds[0]}/report.pdf`, { headers: auth() }).then(
        async (r) => {
          const bytes = Buffer.from(await r.arrayBuffer());
          order.push('pdf');
          return { status: r.status, bytes };
        },
      );
      await pdfStarted;
      const health = await fetch(`${base}/api/health`).then((r) => {
        order.push('health');
        return r.status;
      });
      const done = await pdf;
      expect(health).toBe(200);
      expect(done.status).toBe(200);
      expect(done.bytes.subarray(0, 5).toString()).toBe('%PDF-');
      expect(order).toEqual(['health', 'pdf']);
    } finally {
      await app.close();
    }
  }, 120_000);
});
