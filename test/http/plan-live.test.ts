import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import type { AnalyzeRunner } from '../../server/jobs/pool.js';
import { testApp, type TestApp } from './helpers.js';

const g = 9.80665;
const fb1 = JSON.parse(
  readFileSync(new URL('../../sample-data/backwash-tank-fb1.vessel.json', import.meta.url), 'utf8'),
);
const logBytes = readFileSync(
  new URL('../../sample-data/fb1-2026-03-10-preamble.csv', import.meta.url),
);
/** The real engine, in this thread (the service runs the same function in its worker pool). */
const engine: AnalyzeRunner = async (req) => analyzeDrainTest(req);

let t: TestApp;
let vesselId: number;
beforeAll(async () => {
  t = await testApp({ analyze: engine, liveRefitMs: 0 });
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: fb1,
  });
  expect(v.statusCode, v.body).toBe(201);
  vesselId = v.json().id;
});
afterAll(async () => {
  if (t.app.server.listening) await t.app.close();
});

/** Byte offsets just past each line feed, so rows go whole. */
function lineEnds(bytes: Buffer): number[] {
  const ends: number[] = [];
  for (let i = 0; i < bytes.length; i++) if (bytes[i] === 0x0a) ends.push(i + 1);
  return ends;
}

describe('POST /api/vessels/:id/plan', () => {
  it('plans FB-1 from 3.5 m: drain time by the closed form, the peak beside the stated limit', async () => {
    const res = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/plan`,
      headers: t.auth('auditor'),
      payload: {
        startLevelM: 3.5,
        sensor: { resolutionM: 0.001, noiseM: 0.0015, sampleIntervalS: 1 },
        dischargeLimitLS: 12,
      },
    });
    expect(res.statusCode, res.body).toBe(200);
    const plan = res.json();
    const closed =
      ((2 * Math.PI * 3.2 ** 2) / 4 / (0.61 * ((Math.PI * 0.05 ** 2) / 4) * Math.sqrt(2 * g))) *
      Math.sqrt(3.5);
    expect(Math.abs(plan.test.drainTimeToOutletS / closed - 1)).toBeLessThan(0.005);
    expect(plan.discharge.withinLimit).toBe(true);
    expect(plan.cautions.length).toBeGreaterThan(3);
  });

  it('refuses a body without a sensor (400, path) and a start above the top (422, field)', async () => {
    const a = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/plan`,
      headers: t.auth('technician'),
      payload: { startLevelM: 3 },
    });
    expect(a.statusCode).toBe(400);
    expect(a.json().errors[0].path).toBe('body.sensor');
    const b = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/plan`,
      headers: t.auth('technician'),
      payload: { startLevelM: 7, sensor: { noiseM: 0.001, sampleIntervalS: 1 } },
    });
    expect(b.statusCode).toBe(422);
    expect(b.json().field).toBe('startLevelM');
  });
});

describe('live drain test', () => {
  it('fed in pieces: acknowledged, a resend kept once, a gap refused, enough data before the end, closed into the same bytes as the file', async () => {
    const open = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/live`,
      headers: t.auth('technician'),
      payload: {
        fileName: 'fb1-live.csv',
        target: { quantity: 'effective-area', relativeStandardUncertainty: 0.0005 },
      },
    });
    expect(open.statusCode, open.body).toBe(201);
    const id = open.json().id;
    const ends = lineEnds(logBytes);
    const send = (from: number, to: number) =>
      t.app.inject({
        method: 'POST',
        url: `/api/live/${id}/rows?offset=${from}`,
        headers: { ...t.auth('technician'), 'content-type': 'text/csv' },
        payload: logBytes.subarray(from, to),
      });
    let acked = 0;
    let enoughAtRow: number | null = null;
    for (let k = 99; k < ends.length + 99; k += 100) {
      const to = ends[Math.min(k, ends.length - 1)];
      const r = await send(acked, to);
      expect(r.statusCode, r.body).toBe(200);
      expect(r.json().receivedBytes).toBe(to);
      acked = to;
      // wait for the refit of these rows (the runner is in this thread; the refit timer is 0 ms)
      for (let i = 0; i < 200; i++) {
        const s = (
          await t.app.inject({ method: 'GET', url: `/api/live/${id}`, headers: t.auth('auditor') })
        ).json();
        if (s.latest && s.latest.rows === s.rows) {
          if (s.latest.enough && enoughAtRow === null) enoughAtRow = s.rows;
          break;
        }
        await new Promise((r) => setTimeout(r, 10));
      }
      if (k === 999) {
        // a sender that lost its answer resends from an earlier offset: only the new part is kept
        const again = await send(ends[900], acked);
        expect(again.json().receivedBytes).toBe(acked);
        // a gap is refused with the count held
        const gap = await send(acked + 10, acked + 20);
        expect(gap.statusCode).toBe(409);
        expect(gap.headers['efflux-received-bytes']).toBe(String(acked));
        // bytes that differ from those held are refused, not overwritten
        const changed = await t.app.inject({
          method: 'POST',
          url: `/api/live/${id}/rows?offset=0`,
          headers: { ...t.auth('technician'), 'content-type': 'text/csv' },
          payload: Buffer.from('Site: elsewhere\n'),
        });
        expect(changed.statusCode).toBe(409);
      }
    }
    expect(acked).toBe(logBytes.length);
    expect(enoughAtRow, 'the enough-data notice came').not.toBeNull();
    expect(enoughAtRow!).toBeLessThan(ends.length);
    console.info(`live: enough data after ${enoughAtRow} of ${ends.length} lines`);
    const state = (
      await t.app.inject({ method: 'GET', url: `/api/live/${id}`, headers: t.auth('auditor') })
    ).json();
    expect(state.latest.openingS).toBeGreaterThan(0);
    expect(state.latest.message).toMatch(/^Enough data/);

    const closed = await t.app.inject({
      method: 'POST',
      url: `/api/live/${id}/close`,
      headers: t.auth('technician'),
    });
    expect(closed.statusCode, closed.body).toBe(201);
    const { test } = closed.json();
    expect(test.sha256).toBe(createHash('sha256').update(logBytes).digest('hex'));
    const raw = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${test.id}/raw`,
      headers: t.auth('auditor'),
    });
    expect(Buffer.compare(raw.rawPayload, logBytes)).toBe(0);
    const audit = await t.store.audit.list({
      entityType: 'test',
      entityId: String(test.id),
    } as never);
    expect(JSON.stringify(audit)).toMatch(/test\.(create|upload)/);
    // a closed live test takes no more rows
    const late = await send(acked, acked);
    expect(late.statusCode).toBe(409);
  });

  it('a service restart loses nothing: the bytes held are committed, the live test is taken up again and closes into the file', async () => {
    const ends = lineEnds(logBytes);
    const open = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${vesselId}/live`,
      headers: t.auth('technician'),
      payload: { fileName: 'restart.csv' },
    });
    const id = open.json().id;
    const part = ends[1200];
    const r = await t.app.inject({
      method: 'POST',
      url: `/api/live/${id}/rows?offset=0`,
      headers: { ...t.auth('technician'), 'content-type': 'application/octet-stream' },
      payload: logBytes.subarray(0, part),
    });
    expect(r.json().receivedBytes).toBe(part);
    // a second service on the same database, as after a restart
    const { buildApp } = await import('../../server/http/app.js');
    const again = await buildApp({ store: t.store, analyze: engine, liveRefitMs: 0 });
    await again.ready();
    try {
      const s = (
        await again.inject({ method: 'GET', url: `/api/live/${id}`, headers: t.auth('auditor') })
      ).json();
      expect(s.receivedBytes).toBe(part);
      expect(s.rows).toBe(1201);
      const rest = await again.inject({
        method: 'POST',
        url: `/api/live/${id}/rows?offset=${part}`,
        headers: { ...t.auth('technician'), 'content-type': 'application/octet-stream' },
        payload: logBytes.subarray(part),
      });
      expect(rest.json().receivedBytes).toBe(logBytes.length);
      // the first test already stored these bytes for this vessel: refused as for an upload, naming it, until asked again
      const dup = await again.inject({
        method: 'POST',
        url: `/api/live/${id}/close`,
        headers: t.auth('technician'),
      });
      expect(dup.statusCode, dup.body).toBe(409);
      expect(dup.json().type).toBe('urn:efflux:problem:duplicate-upload');
      expect(typeof dup.json().existingTestId).toBe('number');
      const closed = await again.inject({
        method: 'POST',
        url: `/api/live/${id}/close?allowDuplicate=true`,
        headers: t.auth('technician'),
      });
      expect(closed.statusCode, closed.body).toBe(201);
      const raw = await t.store.tests.rawBytes(closed.json().test.sha256);
      expect(Buffer.compare(Buffer.from(raw), logBytes)).toBe(0);
      expect((await t.store.live.get(id))!.status).toBe('closed');
      expect((await t.store.live.bytes(id)).length).toBe(0);
    } finally {
      await again.close();
    }
  });

  it('server-sent events on a real socket: the state first, then readings and a fit', async () => {
    const address = await t.app.listen({ host: '127.0.0.1', port: 0 });
    const open = await fetch(`${address}/api/vessels/${vesselId}/live`, {
      method: 'POST',
      headers: { ...t.auth('technician'), 'content-type': 'application/json' },
      body: JSON.stringify({ fileName: 'x.csv' }),
    });
    const { id } = await open.json();
    const ac = new AbortController();
    const events = await fetch(`${address}/api/live/${id}/events`, {
      headers: t.auth('auditor'),
      signal: ac.signal,
    });
    expect(events.headers.get('content-type')).toMatch(/^text\/event-stream/);
    const reader = events.body!.getReader();
    await fetch(`${address}/api/live/${id}/rows?offset=0`, {
      method: 'POST',
      headers: { ...t.auth('technician'), 'content-type': 'application/octet-stream' },
      body: logBytes.subarray(0, lineEnds(logBytes)[600]),
    });
    let text = '';
    while (!/event: fit/.test(text) || !/event: rows\ndata: .*"readings":\{/.test(text)) {
      const { value, done } = await reader.read();
      if (done) break;
      text += new TextDecoder().decode(value);
    }
    ac.abort();
    expect(text.indexOf('event: state')).toBe(0);
    const rows = JSON.parse(/event: rows\ndata: (.*"readings":\{.*)\n/.exec(text)![1]);
    expect(rows.readings.timeS.length).toBeGreaterThan(500);
    expect(rows.readings.levelM[0]).toBeCloseTo(3.498, 6);

    // an open stream does not hold the service's shutdown: it is ended first
    const still = await fetch(`${address}/api/live/${id}/events`, { headers: t.auth('auditor') });
    const r2 = still.body!.getReader();
    await r2.read();
    await t.app.close();
    let ended = false;
    for (let i = 0; i < 10 && !ended; i++) ended = (await r2.read()).done;
    expect(ended).toBe(true);
  });
});
