/**
 * Malformed requests answer 4xx problem+json (inject, and a real listening server where the
 * socket matters), with nothing stored; pending tests are retried or withdrawn through the API,
 * with roles and audit entries; a test that keeps failing is marked and left for a person.
 */
import { connect } from 'node:net';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalysisRequest } from '../../server/core/analysis-contract.js';
import { resumePending } from '../../server/jobs/ingest.js';
import { AnalysisTimeoutError } from '../../server/jobs/pool.js';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { checkDatabase, rowCounts } from '../../server/store/maintenance.js';
import { analyzeDrainTest } from '../http/fake-analyze.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from '../http/helpers.js';

const LOG_PART =
  'Content-Disposition: form-data; name="log"; filename="a.csv"\r\nContent-Type: text/csv\r\n\r\nt,level\n0,2\n1,1.9\n';
const MALFORMED: [string, string, string | Buffer, number][] = [
  ['no closing boundary', 'multipart/form-data; boundary=XX', `--XX\r\n${LOG_PART}`, 400],
  [
    'a wrong boundary',
    'multipart/form-data; boundary=YY',
    `--XX\r\n${LOG_PART}\r\n--XX--\r\n`,
    400,
  ],
  ['no boundary', 'multipart/form-data', `--XX\r\n${LOG_PART}\r\n--XX--\r\n`, 400],
  [
    'garbage bytes',
    'multipart/form-data; boundary=XX',
    Buffer.from([0, 1, 2, 255, 254, 13, 10, 45, 45, 0x58]),
    400,
  ],
  ['not multipart', 'text/plain', 'hello', 415],
];

async function withVessel(t: TestApp) {
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: VESSEL_FILE,
  });
  return v.json().id as number;
}

describe('malformed requests (inject)', () => {
  let t: TestApp;
  let vesselId: number;
  beforeAll(async () => {
    t = await testApp();
    vesselId = await withVessel(t);
  });
  afterAll(() => t.app.close());

  it.each(MALFORMED)('%s: problem+json, nothing stored', async (_name, type, payload, status) => {
    const before = await rowCounts(t.store.sql);
    const r = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/tests`,
      headers: { ...t.auth('technician'), 'content-type': type },
      payload,
    });
    expect(r.statusCode).toBe(status);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json()).toMatchObject({
      status,
      title: expect.any(String),
      detail: expect.any(String),
    });
    expect(await rowCounts(t.store.sql)).toEqual(before);
  });

  it('any Content-Encoding but identity: 415 with Accept-Encoding: identity, on uploads and JSON alike', async () => {
    const before = await rowCounts(t.store.sql);
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/tests`,
      headers: { ...t.auth('technician'), ...m.headers, 'content-encoding': 'gzip' },
      payload: gzipSync(m.payload),
    });
    expect(up.statusCode).toBe(415);
    expect(up.headers['accept-encoding']).toBe('identity');
    expect(up.json()).toMatchObject({ type: 'urn:efflux:problem:content-encoding', status: 415 });
    const json = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: {
        ...t.auth('engineer'),
        'content-type': 'application/json',
        'content-encoding': 'br',
      },
      payload: Buffer.from('xx'),
    });
    expect(json.statusCode).toBe(415);
    const garbage = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: { ...t.auth('engineer'), 'content-type': 'application/json' },
      payload: '{"name": ',
    });
    expect(garbage.statusCode).toBe(400);
    expect(garbage.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(await rowCounts(t.store.sql)).toEqual(before);
    expect((await checkDatabase(t.store.sql)).ok).toBe(true);
  });
});

/** One raw HTTP/1.1 exchange: the status line and the answer's content type. */
function raw(port: number, request: Buffer): Promise<{ status: number; type: string }> {
  return new Promise((resolve, reject) => {
    const s = connect(port, '127.0.0.1');
    let got = '';
    s.on('data', (d) => (got += d.toString('latin1')));
    s.on('error', reject);
    s.on('close', () => {
      const status = Number(/^HTTP\/1\.1 (\d{3})/.exec(got)?.[1] ?? 0);
      resolve({ status, type: /\r\ncontent-type: ([^\r]+)/i.exec(got)?.[1] ?? '' });
    });
    s.end(request);
  });
}

describe('malformed requests (a real listening server)', () => {
  let t: TestApp;
  let vesselId: number;
  let port: number;
  beforeAll(async () => {
    t = await testApp();
    vesselId = await withVessel(t);
    await t.app.listen({ host: '127.0.0.1', port: 0 });
    port = (t.app.server.address() as { port: number }).port;
  });
  afterAll(() => t.app.close());

  const request = (type: string, body: Buffer, extra = '') =>
    Buffer.concat([
      Buffer.from(
        `POST /api/vessels/${vesselId}/tests HTTP/1.1\r\nHost: x\r\nAuthorization: ${t.auth('technician').authorization}\r\n` +
          `Content-Type: ${type}\r\nContent-Length: ${body.length}\r\n${extra}Connection: close\r\n\r\n`,
      ),
      body,
    ]);

  it.each(MALFORMED)(
    '%s: answered on the socket with problem+json',
    async (_name, type, payload, status) => {
      const before = await rowCounts(t.store.sql);
      const r = await raw(port, request(type, Buffer.from(payload)));
      expect(r.status).toBe(status);
      expect(r.type).toMatch(/^application\/problem\+json/);
      expect(await rowCounts(t.store.sql)).toEqual(before);
    },
  );

  it('a gzip body is refused before it is read; the service answers the next request', async () => {
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    const r = await raw(
      port,
      request(m.headers['content-type'], gzipSync(m.payload), 'Content-Encoding: gzip\r\n'),
    );
    expect(r).toMatchObject({
      status: 415,
      type: expect.stringMatching(/^application\/problem\+json/),
    });
    const ok = await raw(port, request(m.headers['content-type'], m.payload));
    expect(ok.status).toBe(201);
  });
});

describe('pending tests: retry, withdraw, marked when they keep failing', () => {
  it('a timed-out upload stays pending and says which test; a technician retries it (audited)', async () => {
    let failNext = 1;
    const t = await testApp({
      analyze: async (req: AnalysisRequest) => {
        if (failNext-- > 0) throw new AnalysisTimeoutError(120_000);
        return analyzeDrainTest(req);
      },
    });
    const vesselId = await withVessel(t);
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(up.statusCode).toBe(503);
    const id = Number(
      /test (\d+) is kept pending: retry or withdraw it/.exec(up.json().detail)?.[1],
    );
    const pending = (
      await t.app.inject({ url: `/api/tests/${id}`, headers: t.auth('auditor') })
    ).json();
    expect(pending).toMatchObject({
      status: 'pending',
      failedAttempts: 1,
      lastFailure: 'the analysis did not finish within 120 s',
      stuck: false,
    });

    expect(
      (
        await t.app.inject({
          method: 'POST',
          url: `/api/tests/${id}/retry`,
          headers: t.auth('auditor'),
        })
      ).statusCode,
    ).toBe(403);
    const retry = await t.app.inject({
      method: 'POST',
      url: `/api/tests/${id}/retry`,
      headers: t.auth('technician'),
    });
    expect(retry.statusCode).toBe(201);
    expect(retry.json()).toMatchObject({
      test: { id, status: 'analysed' },
      fit: { testId: id, status: 'draft' },
    });
    const again = await t.app.inject({
      method: 'POST',
      url: `/api/tests/${id}/retry`,
      headers: t.auth('technician'),
    });
    expect(again.statusCode).toBe(409);
    const audit = (await t.app.inject({ url: `/api/audit?limit=50`, headers: t.auth('auditor') }))
      .json()
      .items.map((e: { action: string }) => e.action);
    expect(audit).toEqual(expect.arrayContaining(['test.upload', 'test.retry', 'fit.create']));
    await t.app.close();
  });

  it('an engineer withdraws a pending test with a reason: row and bytes gone, the audit log keeps both', async () => {
    const t = await testApp({
      analyze: async () => {
        throw new AnalysisTimeoutError(1000);
      },
    });
    const vesselId = await withVessel(t);
    const before = await rowCounts(t.store.sql);
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    const id = Number(/test (\d+) is kept pending/.exec(up.json().detail)?.[1]);
    const body = { reason: 'logger clock was wrong; test repeated' };
    expect(
      (
        await t.app.inject({
          method: 'POST',
          url: `/api/tests/${id}/withdraw`,
          headers: t.auth('technician'),
          payload: body,
        })
      ).statusCode,
    ).toBe(403);
    expect(
      (
        await t.app.inject({
          method: 'POST',
          url: `/api/tests/${id}/withdraw`,
          headers: t.auth('engineer'),
          payload: {},
        })
      ).statusCode,
    ).toBe(400);
    const w = await t.app.inject({
      method: 'POST',
      url: `/api/tests/${id}/withdraw`,
      headers: t.auth('engineer'),
      payload: body,
    });
    expect(w.statusCode).toBe(200);
    expect(w.json()).toEqual({ withdrawn: id });
    expect(
      (await t.app.inject({ url: `/api/tests/${id}`, headers: t.auth('auditor') })).statusCode,
    ).toBe(404);
    const after = await rowCounts(t.store.sql);
    expect({ ...after, audit_log: 0 }).toEqual({ ...before, audit_log: 0 });
    const entries = (
      await t.app.inject({ url: `/api/audit?limit=50`, headers: t.auth('auditor') })
    ).json().items;
    const withdraw = entries.find((e: { action: string }) => e.action === 'test.withdraw');
    expect(withdraw).toMatchObject({ entityId: String(id), after: body });
    expect((await checkDatabase(t.store.sql)).ok).toBe(true);
    await t.app.close();
  });

  it('resume: one failure does not stop the others; after 3 failures a test is marked stuck and left for a person', async () => {
    const t = await testApp();
    const vesselId = await withVessel(t);
    const put = async (body: string) =>
      (
        await t.store.tests.createPending(SYSTEM_ACTOR, {
          vesselId,
          outletId: null,
          log: { bytes: Buffer.from(body), fileName: 'x.csv' },
          settings: {},
        })
      ).id;
    const bad = await put('t,level\nFAIL\n0,1\n1,0.9\n');
    const good = await put('t,level\n0,1\n1,0.9\n');
    const analyze = async (req: AnalysisRequest) => {
      if (new TextDecoder().decode(req.log.bytes).includes('FAIL')) throw new Error('worker fault');
      return analyzeDrainTest(req);
    };
    expect(await resumePending(t.store, analyze, SYSTEM_ACTOR)).toEqual({
      done: 1,
      refused: 0,
      failed: [{ testId: bad, reason: 'worker fault' }],
      stuck: 0,
    });
    expect((await t.store.tests.get(good)).status).toBe('analysed');
    await resumePending(t.store, analyze, SYSTEM_ACTOR);
    await resumePending(t.store, analyze, SYSTEM_ACTOR);
    expect(await t.store.tests.get(bad)).toMatchObject({ failedAttempts: 3, stuck: true });
    expect(await resumePending(t.store, analyze, SYSTEM_ACTOR)).toEqual({
      done: 0,
      refused: 0,
      failed: [],
      stuck: 1,
    });
    expect((await t.store.tests.get(bad)).failedAttempts).toBe(3); // not tried again
    const page = (
      await t.app.inject({ url: `/api/vessels/${vesselId}/tests`, headers: t.auth('auditor') })
    ).json();
    expect(page.items.find((x: { id: number }) => x.id === bad)).toMatchObject({
      stuck: true,
      failedAttempts: 3,
      lastFailure: 'worker fault',
    });
    await t.app.close();
  });
});
