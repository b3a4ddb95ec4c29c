/**
 * Cookies and origins on a real listening server (inject skips the socket and the Host header a
 * browser sends): a cookie-authenticated upload from another port of the same host is 403, from
 * the workbench's own origin 201; bearer requests are unaffected; revoking the token a session was
 * opened with makes that session answer 401 at once.
 */
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../server/http/app.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { fakeAnalyze } from './fake-analyze.js';
import { multipart, VESSEL_FILE } from './helpers.js';
import { openTestStore } from '../support/store.js';

let store: Store;
let app: Awaited<ReturnType<typeof buildApp>>;
let base = '';
let port = 0;
let techToken = '';
let techTokenId = 0;
let adminToken = '';
let vesselId = 0;
let n = 0;

beforeAll(async () => {
  store = await openTestStore();
  const tech = await store.users.createToken(SYSTEM_ACTOR, 'technician-srv', 'technician');
  techToken = tech.token;
  techTokenId = tech.tokenId;
  adminToken = (await store.users.createToken(SYSTEM_ACTOR, 'admin-srv', 'admin')).token;
  app = await buildApp({ store, analyze: fakeAnalyze });
  await app.listen({ host: '127.0.0.1', port: 0 });
  port = (app.server.address() as AddressInfo).port;
  base = `http://127.0.0.1:${port}`;
  const v = await fetch(`${base}/api/vessels`, {
    method: 'POST',
    headers: { authorization: `Bearer ${adminToken}`, 'content-type': 'application/json' },
    body: JSON.stringify(VESSEL_FILE),
  });
  vesselId = (await v.json()).id;
});

afterAll(async () => {
  await app?.close();
  await store?.close();
});

async function signIn(token: string, origin = base): Promise<string> {
  const r = await fetch(`${base}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin },
    body: JSON.stringify({ token }),
  });
  expect(r.status).toBe(201);
  return r.headers.get('set-cookie')!.split(';')[0];
}

function uploadWith(headers: Record<string, string>) {
  const m = multipart([
    {
      field: 'log',
      name: 'log.csv',
      bytes: Buffer.from(`t,level\n0,${2 + ++n / 1000}\n1,1.9\n2,1.8\n`),
    },
  ]);
  return fetch(`${base}/api/vessels/${vesselId}/tests`, {
    method: 'POST',
    headers: { ...m.headers, ...headers },
    body: m.payload,
  });
}

describe('cookie-authenticated writes only from the workbench origin (real server)', () => {
  it('an upload with the cookie from another port of the same host is 403; from our own origin it is 201', async () => {
    const cookie = await signIn(techToken);
    const foreign = await uploadWith({
      cookie,
      origin: `http://127.0.0.1:${port === 65535 ? port - 1 : port + 1}`,
    });
    expect(foreign.status).toBe(403);
    expect(foreign.headers.get('content-type')).toMatch(/problem\+json/);
    expect((await foreign.json()).type).toBe('urn:efflux:problem:foreign-origin');
    const none = await uploadWith({ cookie }); // neither Origin nor Sec-Fetch-Site
    expect(none.status).toBe(403);
    const crossSite = await uploadWith({ cookie, 'sec-fetch-site': 'same-site' });
    expect(crossSite.status).toBe(403);
    expect((await uploadWith({ cookie, origin: base })).status).toBe(201);
    expect((await uploadWith({ cookie, 'sec-fetch-site': 'same-origin' })).status).toBe(201);
    // reads with the cookie are not writes: no origin needed
    expect((await fetch(`${base}/api/session`, { headers: { cookie } })).status).toBe(200);
  });

  it('bearer-token requests are unaffected by the origin', async () => {
    const r = await uploadWith({
      authorization: `Bearer ${techToken}`,
      origin: 'http://evil.example',
    });
    expect(r.status).toBe(201);
  });

  it('sign-in from a foreign page is refused', async () => {
    const r = await fetch(`${base}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: `http://localhost:${port}` },
      body: JSON.stringify({ token: techToken }),
    });
    expect(r.status).toBe(403);
  });

  it('revoking the token a session was opened with makes the open session answer 401 at once', async () => {
    const cookie = await signIn(techToken);
    expect((await fetch(`${base}/api/session`, { headers: { cookie } })).status).toBe(200);
    const revoke = await fetch(`${base}/api/tokens/${techTokenId}`, {
      method: 'DELETE',
      headers: { authorization: `Bearer ${adminToken}` },
    });
    expect(revoke.status).toBe(200);
    const after = await fetch(`${base}/api/session`, { headers: { cookie } });
    expect(after.status).toBe(401);
  });
});
