import { describe, expect, it } from 'vitest';
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
  return { ...t, v, test: up.test, fit: up.fit };
}

describe('vessels', () => {
  it('creates (201 with id), reads, lists with paging, updates (revision, audit before/after)', async () => {
    const t = await testApp();
    const c = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('admin'),
      payload: VESSEL_FILE,
    });
    expect(c.statusCode).toBe(201);
    const id = c.json().id;
    expect(c.json().spec).toEqual(VESSEL_FILE);
    const dup = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('admin'),
      payload: VESSEL_FILE,
    });
    expect(dup.statusCode).toBe(409);
    const u = await t.app.inject({
      method: 'PUT',
      url: `/api/vessels/${id}`,
      headers: t.auth('engineer'),
      payload: { ...VESSEL_FILE, notes: 'resurveyed' },
    });
    expect(u.json()).toMatchObject({ id, revision: 2 });
    const list = await t.app.inject({
      method: 'GET',
      url: '/api/vessels?limit=1',
      headers: t.auth('technician'),
    });
    expect(list.json()).toMatchObject({ total: 1, limit: 1, offset: 0 });
    const audit = await t.store.audit.list({ entityType: 'vessel', entityId: String(id) });
    expect(audit.map((e) => e.action)).toEqual(['vessel.create', 'vessel.update']);
    expect((audit[1].before as { spec: object }).spec).toEqual(VESSEL_FILE);
  });

  it('refuses a bad vessel file with 422 naming the field; nothing stored', async () => {
    const t = await testApp();
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('admin'),
      payload: { ...VESSEL_FILE, outlet: { boreM: -1, elevationM: 0 } },
    });
    expect(res.statusCode).toBe(422);
    expect(res.json().field).toMatch(/^outlet\.boreM/);
    expect(await t.store.vessels.count()).toBe(0);
  });

  it('bad path and query parameters: 400 with the path', async () => {
    const t = await testApp();
    const a = await t.app.inject({
      method: 'GET',
      url: '/api/vessels/abc',
      headers: t.auth('admin'),
    });
    expect(a.statusCode).toBe(400);
    expect(a.json().errors[0].path).toBe('params.id');
    const b = await t.app.inject({
      method: 'GET',
      url: '/api/vessels?limit=0',
      headers: t.auth('admin'),
    });
    expect(b.json().errors[0].path).toBe('querystring.limit');
    const c = await t.app.inject({
      method: 'GET',
      url: '/api/vessels/77',
      headers: t.auth('admin'),
    });
    expect(c.statusCode).toBe(404);
    expect(c.headers['content-type']).toMatch(/^application\/problem\+json/);
  });
});

describe('fits', () => {
  it('refit makes a new draft and marks the old superseded; review once; auditors cannot change', async () => {
    const t = await withFit();
    const r = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${t.fit.id}/refit`,
      headers: t.auth('technician'),
      payload: { settings: { window: '1..3' } },
    });
    expect(r.statusCode).toBe(201);
    const nf = r.json();
    expect(nf.settings).toEqual({ window: '1..3' });
    expect(nf.result.window_setting).toBe('1..3');
    const old = (
      await t.app.inject({
        method: 'GET',
        url: `/api/fits/${t.fit.id}`,
        headers: t.auth('auditor'),
      })
    ).json();
    expect(old.supersededBy).toBe(nf.id);
    expect(old.result).toEqual(t.fit.result); // kept as it was
    const again = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${t.fit.id}/refit`,
      headers: t.auth('engineer'),
      payload: { settings: {} },
    });
    expect(again.statusCode).toBe(409);
    const bad = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${nf.id}/refit`,
      headers: t.auth('engineer'),
      payload: { settings: { dateOrder: 'x' } },
    });
    expect(bad.statusCode).toBe(400);

    const byAud = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${nf.id}/review`,
      headers: t.auth('auditor'),
      payload: { decision: 'approve' },
    });
    expect(byAud.statusCode).toBe(403);
    const ok = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${nf.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve', comment: 'window fine' },
    });
    expect(ok.json()).toMatchObject({ status: 'approved', review: { comment: 'window fine' } });
    const twice = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${nf.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'reject' },
    });
    expect(twice.statusCode).toBe(409);
    const list = (
      await t.app.inject({
        method: 'GET',
        url: `/api/tests/${t.test.id}/fits`,
        headers: t.auth('technician'),
      })
    ).json();
    expect(list.items.map((f: { id: number }) => f.id)).toEqual([t.fit.id, nf.id]);
    const vf = (
      await t.app.inject({
        method: 'GET',
        url: `/api/vessels/${t.v.id}/fits`,
        headers: t.auth('technician'),
      })
    ).json();
    expect(vf.total).toBe(2);
  });
});

describe('maintenance events', () => {
  it('engineers record, engineers and auditors list, technicians neither', async () => {
    const t = await withFit();
    const outletId = t.v.outlets[0].id;
    const e = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${t.v.id}/events`,
      headers: t.auth('engineer'),
      payload: { outletId, kind: 'cleaned', occurredAt: '2026-04-01' },
    });
    expect(e.statusCode).toBe(201);
    const wrong = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${t.v.id}/events`,
      headers: t.auth('engineer'),
      payload: { outletId: 999, kind: 'cleaned', occurredAt: '2026-04-01' },
    });
    expect(wrong.statusCode).toBe(422);
    const badKind = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${t.v.id}/events`,
      headers: t.auth('engineer'),
      payload: { kind: 'painted', occurredAt: '2026-04-01' },
    });
    expect(badKind.json().errors[0].path).toBe('body.kind');
    const l = await t.app.inject({
      method: 'GET',
      url: `/api/vessels/${t.v.id}/events`,
      headers: t.auth('auditor'),
    });
    expect(l.json().items).toEqual([e.json()]);
  });
});

describe('audit log over HTTP', () => {
  it('auditors read with filters and verify the chain', async () => {
    const t = await withFit();
    const all = (
      await t.app.inject({ method: 'GET', url: '/api/audit', headers: t.auth('auditor') })
    ).json();
    expect(all.items.map((e: { action: string }) => e.action)).toEqual(
      expect.arrayContaining(['vessel.create', 'test.upload', 'fit.create']),
    );
    const fitsOnly = (
      await t.app.inject({
        method: 'GET',
        url: '/api/audit?entityType=fit',
        headers: t.auth('auditor'),
      })
    ).json();
    expect(fitsOnly.items.every((e: { entityType: string }) => e.entityType === 'fit')).toBe(true);
    const paged = (
      await t.app.inject({ method: 'GET', url: '/api/audit?limit=2', headers: t.auth('admin') })
    ).json();
    expect(paged.items.length).toBe(2);
    expect(paged.nextAfterSeq).toBe(paged.items[1].seq);
    const v = (
      await t.app.inject({ method: 'GET', url: '/api/audit/verify', headers: t.auth('auditor') })
    ).json();
    expect(v.ok).toBe(true);
  });

  it('every change and its audit entry commit together: a failed change leaves no entry', async () => {
    const t = await withFit();
    const before = (await t.store.audit.list({ limit: 1000 })).length;
    await t.app.inject({
      method: 'POST',
      url: `/api/fits/${t.fit.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve' },
    });
    await t.app.inject({
      method: 'POST',
      url: `/api/fits/${t.fit.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve' },
    }); // 409
    expect((await t.store.audit.list({ limit: 1000 })).length).toBe(before + 1);
  });
});

describe('session', () => {
  it('signs in with a token to an httpOnly SameSite=Strict cookie, and out again', async () => {
    const t = await testApp();
    const bad = await t.app.inject({
      method: 'POST',
      url: '/api/session',
      payload: { token: 'efx_wrong' },
    });
    expect(bad.statusCode).toBe(401);
    const s = await t.app.inject({
      method: 'POST',
      url: '/api/session',
      payload: { token: t.tokens.engineer },
    });
    expect(s.statusCode).toBe(201);
    const setCookie = String(s.headers['set-cookie']);
    expect(setCookie).toMatch(/HttpOnly/);
    expect(setCookie).toMatch(/SameSite=Strict/);
    const cookie = setCookie.split(';')[0];
    const me = await t.app.inject({ method: 'GET', url: '/api/session', headers: { cookie } });
    expect(me.json().user.role).toBe('engineer');
    // a cookie-authenticated write must show it comes from the workbench's own origin
    expect(
      (await t.app.inject({ method: 'DELETE', url: '/api/session', headers: { cookie } }))
        .statusCode,
    ).toBe(403);
    expect(
      (
        await t.app.inject({
          method: 'DELETE',
          url: '/api/session',
          headers: { cookie, origin: 'http://localhost' },
        })
      ).statusCode,
    ).toBe(204);
    expect(
      (await t.app.inject({ method: 'GET', url: '/api/session', headers: { cookie } })).statusCode,
    ).toBe(401);
  });

  it('rate-limits sign-in attempts', async () => {
    const t = await testApp({ signInPerMinute: 3 });
    const codes: number[] = [];
    for (let i = 0; i < 5; i++)
      codes.push(
        (await t.app.inject({ method: 'POST', url: '/api/session', payload: { token: 'x' } }))
          .statusCode,
      );
    expect(codes).toEqual([401, 401, 401, 429, 429]);
  });
});

describe('service', () => {
  it('health without credentials; OpenAPI lists the routes; strict CSP; no CORS', async () => {
    const t = await testApp();
    const h = await t.app.inject({
      method: 'GET',
      url: '/api/health',
      headers: { origin: 'https://elsewhere.example' },
    });
    expect(h.json()).toEqual({ status: 'ok', demo: false });
    expect(h.headers['access-control-allow-origin']).toBeUndefined();
    const csp = String(h.headers['content-security-policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toContain('unsafe-inline');
    const doc = (await t.app.inject({ method: 'GET', url: '/api/openapi.json' })).json();
    expect(Object.keys(doc.paths)).toEqual(
      expect.arrayContaining([
        '/api/vessels',
        '/api/vessels/{id}/tests',
        '/api/fits/{id}/review',
        '/api/audit',
      ]),
    );
    expect(doc.paths['/api/vessels'].get.parameters.map((p: { name: string }) => p.name)).toEqual([
      'limit',
      'offset',
    ]);
    const docs = await t.app.inject({ method: 'GET', url: '/api/docs/' });
    expect(docs.statusCode).toBeLessThan(400);
  });
});
