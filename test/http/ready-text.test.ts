import { describe, expect, it } from 'vitest';
import { matchesIfNoneMatch } from '../../server/http/ready-text.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE } from './helpers.js';

async function withFit() {
  const t = await testApp();
  const v = (
    await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: VESSEL_FILE,
    })
  ).json();
  const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }], { window: '0..3' });
  const up = (
    await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    })
  ).json();
  return { ...t, v, fit: up.fit };
}

describe('ETag and If-None-Match on the hot reads', () => {
  it('a fit: 304 for the version held, 200 with a new ETag after a review', async () => {
    const t = await withFit();
    const url = `/api/fits/${t.fit.id}`;
    const a = await t.app.inject({ method: 'GET', url, headers: t.auth('auditor') });
    expect(a.statusCode).toBe(200);
    expect(a.headers['content-type']).toBe('application/json; charset=utf-8');
    expect(a.json()).toEqual(await t.store.fits.get(t.fit.id));
    const etag = String(a.headers.etag);
    expect(etag).toMatch(/^"[\w-]{22}"$/);
    const same = await t.app.inject({
      method: 'GET',
      url,
      headers: { ...t.auth('auditor'), 'if-none-match': etag },
    });
    expect(same.statusCode).toBe(304);
    expect(same.body).toBe('');
    expect(same.headers.etag).toBe(etag);
    await t.app.inject({
      method: 'POST',
      url: `${url}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve' },
    });
    const after = await t.app.inject({
      method: 'GET',
      url,
      headers: { ...t.auth('auditor'), 'if-none-match': etag },
    });
    expect(after.statusCode).toBe(200);
    expect(after.json().status).toBe('approved');
    expect(after.headers.etag).not.toBe(etag);
  });

  it("a vessel's tests: 304 while unchanged; no credentials still 401 (the check comes first)", async () => {
    const t = await withFit();
    const url = `/api/vessels/${t.v.id}/tests?limit=5`;
    const a = await t.app.inject({ method: 'GET', url, headers: t.auth('technician') });
    expect(a.json()).toMatchObject({ total: 1, limit: 5, offset: 0 });
    const same = await t.app.inject({
      method: 'GET',
      url,
      headers: { ...t.auth('technician'), 'if-none-match': `W/${a.headers.etag}` },
    });
    expect(same.statusCode).toBe(304);
    const anon = await t.app.inject({
      method: 'GET',
      url,
      headers: { 'if-none-match': String(a.headers.etag) },
    });
    expect(anon.statusCode).toBe(401);
    expect(anon.headers['content-security-policy']).toContain("default-src 'self'");
    const missing = await t.app.inject({
      method: 'GET',
      url: '/api/vessels/999/tests',
      headers: t.auth('technician'),
    });
    expect(missing.statusCode).toBe(404);
    expect(missing.headers['content-type']).toContain('application/problem+json');
  });

  it('If-None-Match lists, weak tags and "*" (RFC 9110 §13.1.2, weak comparison)', () => {
    expect(matchesIfNoneMatch('"a", "b"', '"b"')).toBe(true);
    expect(matchesIfNoneMatch('W/"b"', '"b"')).toBe(true);
    expect(matchesIfNoneMatch('*', '"b"')).toBe(true);
    expect(matchesIfNoneMatch('"bb"', '"b"')).toBe(false);
    expect(matchesIfNoneMatch(undefined, '"b"')).toBe(false);
  });
});
