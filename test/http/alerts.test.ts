/**
 * Status-change alerts: an approval that changes an outlet's status is recorded (table and audit
 * log) and POSTed to the webhook receivers after the commit. Receivers are node:http servers on
 * 127.0.0.1 inside this test: one that answers, one that fails twice then answers, one that never
 * answers (the approval must come back while that receiver still holds the request open).
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createNotifier, parseWebhookList, type Notifier } from '../../server/jobs/alerts.js';
import { multipart, testApp, type TestApp } from './helpers.js';
import { logFor, trendAnalyze } from './trend-fake.js';

interface Receiver {
  url: string;
  bodies: unknown[];
  hits: number;
  server: Server;
  /** Requests held open (the silent receiver). */
  held: ServerResponse[];
  arrived: Promise<void>;
}

function receiver(
  handle: (hit: number, res: ServerResponse, r: Receiver) => void,
): Promise<Receiver> {
  let signal!: () => void;
  const r: Receiver = {
    url: '',
    bodies: [],
    hits: 0,
    server: null as unknown as Server,
    held: [],
    arrived: new Promise<void>((res) => (signal = res)),
  };
  r.server = createServer((req: IncomingMessage, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c) => chunks.push(c));
    req.on('end', () => {
      r.hits++;
      r.bodies.push(JSON.parse(Buffer.concat(chunks).toString('utf8')));
      handle(r.hits, res, r);
      signal();
    });
  });
  return new Promise((resolve) =>
    r.server.listen(0, '127.0.0.1', () => {
      r.url = `http://127.0.0.1:${(r.server.address() as AddressInfo).port}/hook`;
      resolve(r);
    }),
  );
}

const DAY = 86_400_000;
const START = Date.UTC(2025, 0, 10);
let ok: Receiver, flaky: Receiver, silent: Receiver;
let notifier: Notifier;
let t: TestApp;
const logLines: string[] = [];

beforeAll(async () => {
  ok = await receiver((_n, res) => res.writeHead(204).end());
  flaky = await receiver((n, res) => res.writeHead(n <= 2 ? 503 : 200).end('{}'));
  silent = await receiver((_n, res, r) => void r.held.push(res)); // never answers
  notifier = createNotifier({
    urls: [ok.url, flaky.url, silent.url],
    baseDelayMs: 20,
    attempts: 4,
    timeoutMs: 60_000,
    log: (l) => logLines.push(l),
  });
  t = await testApp({ analyze: trendAnalyze, notifier, clockMs: () => START + 300 * DAY });
});

afterAll(async () => {
  for (const res of silent.held) res.destroy();
  await notifier.close(100);
  await t.app.close();
  for (const r of [ok, flaky, silent]) r.server.close();
});

/** Polls a condition (deliveries happen in the background); gives up after 5 s so a failure shows. */
async function until(cond: () => boolean) {
  for (let i = 0; i < 500 && !cond(); i++) await new Promise((r) => setTimeout(r, 10));
}

async function uploadAndApprove(vesselId: number, cda: number, atMs: number) {
  const m = multipart([{ field: 'log', name: 'log.csv', bytes: logFor(cda, cda * 0.003) }], {
    testedAt: new Date(atMs).toISOString(),
    allowDuplicate: 'true',
  }); // equal Cd·a → equal bytes, on purpose
  const up = await t.app.inject({
    method: 'POST',
    url: `/api/vessels/${vesselId}/tests`,
    headers: { ...t.auth('technician'), ...m.headers },
    payload: m.payload,
  });
  const fitId = up.json().fit.id as number;
  const res = await t.app.inject({
    method: 'POST',
    url: `/api/fits/${fitId}/review`,
    headers: t.auth('engineer'),
    payload: { decision: 'approve' },
  });
  expect(res.statusCode).toBe(200);
  return fitId;
}

describe('status-change alerts', () => {
  it('records each change with its audit entry and tells every receiver, retrying the failing one', async () => {
    const v = (
      await t.app.inject({
        method: 'POST',
        url: '/api/vessels',
        headers: t.auth('engineer'),
        payload: {
          name: 'Alert tank',
          shape: { kind: 'vertical-cylinder', diameterM: 2 },
          outlet: { boreM: 0.03, elevationM: 0 },
          sensor: { zeroElevationM: 0 },
        },
      })
    ).json();
    const outletId = v.outlets[0].id;
    // eight steady months: "not enough tests" until the third, then "steady"
    const fits: number[] = [];
    for (let m = 0; m < 8; m++)
      fits.push(
        await uploadAndApprove(v.id, 4e-4 * (1 + 0.001 * ((m % 2) - 0.5)), START + m * 30 * DAY),
      );
    // the approval came back while the silent receiver still holds its request open
    await silent.arrived;
    expect(silent.held.length).toBe(1);
    expect(silent.held[0].writableEnded).toBe(false);
    // a sudden 6 % loss (the threshold is the default −10 %)
    const drop = await uploadAndApprove(v.id, 4e-4 * 0.94, START + 250 * DAY);

    const changes = (
      await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${outletId}/status-changes`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(
      changes.map((c: { fromStatus: string; toStatus: string }) => [c.fromStatus, c.toStatus]),
    ).toEqual([
      ['not enough tests', 'steady'],
      ['steady', 'sudden change'],
    ]);
    expect(changes[0].fitId).toBe(fits[2]);
    expect(changes[1].fitId).toBe(drop);
    const audit = (
      await t.app.inject({
        method: 'GET',
        url: `/api/audit?action=outlet.status-change&entityId=${outletId}`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(audit.items.map((e: { after: { id: number } }) => e.after.id)).toEqual(
      changes.map((c: { id: number }) => c.id),
    );
    expect(
      (
        await t.app.inject({ method: 'GET', url: '/api/audit/verify', headers: t.auth('auditor') })
      ).json().ok,
    ).toBe(true);

    await until(() => ok.bodies.length >= 2 && flaky.hits >= 4); // the silent one never finishes, so not notifier.idle()
    expect(ok.bodies).toHaveLength(2);
    expect(ok.bodies[1]).toMatchObject({
      type: 'efflux.outlet.status-change',
      id: changes[1].id,
      from: 'steady',
      to: 'sudden change',
      fitId: drop,
      outlet: { id: outletId, vesselName: 'Alert tank' },
    });
    // failed twice (503), then delivered; the second notice then went through at once (4 requests)
    expect(flaky.hits).toBe(4);
    expect(flaky.bodies.map((b) => (b as { id: number }).id)).toEqual([
      changes[0].id,
      changes[0].id,
      changes[0].id,
      changes[1].id,
    ]);
    expect(
      logLines.filter((l) => l.includes(flaky.url) && l.includes('answered 503')),
    ).toHaveLength(2);
    // one at a time per receiver: the second notice waits behind the unanswered first
    expect(silent.hits).toBe(1);
  });

  it('a rejection or an approval that leaves the status as it was records nothing', async () => {
    const before = (
      await t.app.inject({
        method: 'GET',
        url: '/api/audit?action=outlet.status-change',
        headers: t.auth('auditor'),
      })
    ).json().items.length;
    const v = (
      await t.app.inject({ method: 'GET', url: '/api/vessels', headers: t.auth('auditor') })
    )
      .json()
      .items.find((x: { name: string }) => x.name === 'Alert tank');
    await uploadAndApprove(v.id, 4e-4 * 0.94, START + 280 * DAY); // still "sudden change"
    const m = multipart([{ field: 'log', name: 'log.csv', bytes: logFor(1e-4, 1e-6) }], {
      testedAt: new Date(START + 290 * DAY).toISOString(),
    });
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    await t.app.inject({
      method: 'POST',
      url: `/api/fits/${up.json().fit.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'reject' },
    });
    const after = (
      await t.app.inject({
        method: 'GET',
        url: '/api/audit?action=outlet.status-change',
        headers: t.auth('auditor'),
      })
    ).json().items.length;
    expect(after).toBe(before);
  });
});

describe('webhook list (EFFLUX_WEBHOOKS)', () => {
  it('reads comma-separated http(s) addresses and refuses anything else', () => {
    expect(parseWebhookList(undefined)).toEqual([]);
    expect(parseWebhookList(' http://127.0.0.1:9/a , https://example.invalid/b ')).toEqual([
      'http://127.0.0.1:9/a',
      'https://example.invalid/b',
    ]);
    expect(() => parseWebhookList('ftp://x/y')).toThrow(/not an http/);
    expect(() => parseWebhookList('nope')).toThrow(/not a URL/);
  });

  it('gives up after the stated number of tries and logs it', async () => {
    const down = await receiver((_n, res) => res.writeHead(500).end());
    const lines: string[] = [];
    const n = createNotifier({
      urls: [down.url],
      attempts: 3,
      baseDelayMs: 5,
      log: (l) => lines.push(l),
    });
    n.notify({
      type: 'efflux.outlet.status-change',
      id: 1,
      at: 'x',
      outlet: { id: 1, key: 'main', vesselId: 1, vesselName: 'v', site: 's' },
      fitId: 1,
      from: null,
      to: 'steady',
      reason: 'r',
      daysToThreshold: null,
      crossingAt: null,
    });
    await n.idle();
    expect(down.hits).toBe(3);
    expect(lines.at(-1)).toMatch(/gave up on notice 1/);
    await n.close();
    down.server.close();
  });
});
