/**
 * Records a site can trust (issue 12), through HTTP inject: one test date from the log, an approved
 * fit in force until its replacement is approved, four eyes with a marked self-review, duplicates
 * (409) and Idempotency-Key, people and tokens whose revocation ends sessions at once.
 * Cookie and origin checks on a real listening server: records-server.test.ts.
 */
import { describe, expect, it } from 'vitest';
import type { Role } from '../../server/store/users.js';
import { FAKE_LOG_START } from './fake-analyze.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from './helpers.js';

async function withVessel() {
  const t = await testApp();
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: VESSEL_FILE,
  });
  expect(v.statusCode).toBe(201);
  return { ...t, vesselId: v.json().id as number, outletId: v.json().outlets[0].id as number };
}

function upload(
  t: TestApp,
  vesselId: number,
  bytes: Uint8Array,
  fields: Record<string, string> = {},
  as: Role = 'technician',
  headers: Record<string, string> = {},
) {
  const m = multipart([{ field: 'log', name: 'log.csv', bytes }], fields);
  return t.app.inject({
    method: 'POST',
    url: `/api/vessels/${vesselId}/tests`,
    headers: { ...t.auth(as), ...m.headers, ...headers },
    payload: m.payload,
  });
}

const review = (t: TestApp, fitId: number, decision: 'approve' | 'reject', as: Role = 'engineer') =>
  t.app.inject({
    method: 'POST',
    url: `/api/fits/${fitId}/review`,
    headers: t.auth(as),
    payload: { decision },
  });

const count = async (t: TestApp, table: string) =>
  Number(await t.store.sql.value(`SELECT count(*) FROM ${table}`));

/** A log with its own bytes (n decides the levels), so uploads are not duplicates of each other. */
const logN = (n: number) => Buffer.from(`t,level\n0,${2 + n / 1000}\n1,1.98\n2,1.96\n3,1.94\n`);

async function trendFitIds(t: TestApp, outletId: number): Promise<number[]> {
  const res = await t.app.inject({
    method: 'GET',
    url: `/api/outlets/${outletId}/trend`,
    headers: t.auth('auditor'),
  });
  expect(res.statusCode).toBe(200);
  return res
    .json()
    .epochs.flatMap((e: { series: { fitId: number }[] }) => e.series.map((p) => p.fitId));
}

describe('one test date', () => {
  it("without testedAt the test is dated by the fitted window's first reading, the same date in the trend", async () => {
    const t = await withVessel();
    const up = await upload(t, t.vesselId, logN(1));
    expect(up.statusCode).toBe(201);
    expect(up.json().test).toMatchObject({ testedAt: FAKE_LOG_START, testedAtSource: 'log' });
    expect((await review(t, up.json().fit.id, 'approve')).statusCode).toBe(200);
    const trend = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${t.outletId}/trend`,
      headers: t.auth('auditor'),
    });
    expect(trend.json().epochs[0].series[0].testedAt).toBe(FAKE_LOG_START);
    const test = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${up.json().test.id}`,
      headers: t.auth('auditor'),
    });
    expect(test.json().testedAt).toBe(FAKE_LOG_START);
  });

  it('a log with elapsed time only and no testedAt is refused naming testedAt, and nothing is kept', async () => {
    const t = await withVessel();
    const before = { tests: await count(t, 'drain_tests'), raw: await count(t, 'raw_files') };
    const res = await upload(t, t.vesselId, Buffer.from('elapsed_s,level\n0,2\n1,1.9\n2,1.8\n'));
    expect(res.statusCode).toBe(422);
    expect(res.json()).toMatchObject({ field: 'testedAt' });
    expect(res.json().detail).toMatch(/testedAt/);
    expect({ tests: await count(t, 'drain_tests'), raw: await count(t, 'raw_files') }).toEqual(
      before,
    );
    // with a stated date the same file is taken
    const ok = await upload(t, t.vesselId, Buffer.from('elapsed_s,level\n0,2\n1,1.9\n2,1.8\n'), {
      testedAt: '2025-06-02T10:30:00+02:00',
    });
    expect(ok.statusCode).toBe(201);
    expect(ok.json().test).toMatchObject({
      testedAt: '2025-06-02T08:30:00.000Z',
      testedAtSource: 'stated',
    });
  });

  it('a stated testedAt that is not ISO 8601, has no offset, is in the future or before 1990 is 422 naming the field', async () => {
    const t = await withVessel();
    let n = 10;
    for (const bad of [
      'yesterday',
      '14/01/2025 09:00',
      '2025-01-14T09:00',
      '2025-02-30',
      '2099-01-01T00:00:00Z',
      '1985-05-01T00:00:00Z',
    ]) {
      const res = await upload(t, t.vesselId, logN(n++), { testedAt: bad });
      expect(res.statusCode, bad).toBe(422);
      expect(res.json().field, bad).toBe('testedAt');
    }
    expect(await count(t, 'drain_tests')).toBe(0);
  });
});

describe('an approved fit stays in force until its replacement is approved', () => {
  it("a technician's refit leaves the approved fit in the trend; rejecting it changes nothing; approving one replaces it", async () => {
    const t = await withVessel();
    const up = await upload(t, t.vesselId, logN(2));
    const first = up.json().fit.id as number;
    expect((await review(t, first, 'approve')).statusCode).toBe(200);
    expect(await trendFitIds(t, t.outletId)).toEqual([first]);

    const refit = async () =>
      t.app.inject({
        method: 'POST',
        url: `/api/fits/${first}/refit`,
        headers: t.auth('technician'),
        payload: { settings: { window: '1..3' } },
      });
    const draft = await refit();
    expect(draft.statusCode).toBe(201);
    const old = await t.app.inject({
      method: 'GET',
      url: `/api/fits/${first}`,
      headers: t.auth('auditor'),
    });
    expect(old.json()).toMatchObject({ status: 'approved', supersededBy: null });
    expect(await trendFitIds(t, t.outletId)).toEqual([first]);

    expect((await review(t, draft.json().id, 'reject')).statusCode).toBe(200);
    expect(await trendFitIds(t, t.outletId)).toEqual([first]);

    const second = await refit();
    expect((await review(t, second.json().id, 'approve')).statusCode).toBe(200);
    expect(await trendFitIds(t, t.outletId)).toEqual([second.json().id]);
    const replaced = await t.app.inject({
      method: 'GET',
      url: `/api/fits/${first}`,
      headers: t.auth('auditor'),
    });
    expect(replaced.json()).toMatchObject({ status: 'approved', supersededBy: second.json().id });
    // the supersession is in the audit log, in the approval's transaction
    const audit = await t.app.inject({
      method: 'GET',
      url: `/api/audit?entityType=fit&entityId=${first}&action=fit.supersede`,
      headers: t.auth('auditor'),
    });
    expect(audit.json().items).toHaveLength(1);
    expect(audit.json().items[0].actorName).toBe('engineer-1');
  });
});

describe('four eyes', () => {
  it("the uploader's own approval is refused 403; with self-review allowed by an admin it passes and is marked", async () => {
    const t = await withVessel();
    const up = await upload(t, t.vesselId, logN(3), {}, 'engineer');
    const fitId = up.json().fit.id as number;
    const refused = await review(t, fitId, 'approve', 'engineer');
    expect(refused.statusCode).toBe(403);
    expect(refused.headers['content-type']).toMatch(/problem\+json/);
    expect(refused.json().detail).toMatch(/four eyes/);
    // an engineer may not allow it; an admin may
    const setting = {
      method: 'PUT' as const,
      url: '/api/sites/main/settings',
      payload: { selfReviewAllowed: true },
    };
    expect((await t.app.inject({ ...setting, headers: t.auth('engineer') })).statusCode).toBe(403);
    expect((await t.app.inject({ ...setting, headers: t.auth('admin') })).json()).toMatchObject({
      name: 'main',
      selfReviewAllowed: true,
    });
    const ok = await review(t, fitId, 'approve', 'engineer');
    expect(ok.statusCode).toBe(200);
    expect(ok.json().review.selfReview).toBe(true);
    const entry = (
      await t.app.inject({
        method: 'GET',
        url: `/api/audit?entityType=fit&entityId=${fitId}&action=fit.approve`,
        headers: t.auth('auditor'),
      })
    ).json().items[0];
    expect(entry.after.selfReview).toBe(true);
  });

  it('whoever asked for a refit may not approve it; another engineer or admin may', async () => {
    const t = await withVessel();
    const up = await upload(t, t.vesselId, logN(4));
    const draft = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${up.json().fit.id}/refit`,
      headers: t.auth('engineer'),
      payload: { settings: {} },
    });
    expect((await review(t, draft.json().id, 'approve', 'engineer')).statusCode).toBe(403);
    const ok = await review(t, draft.json().id, 'approve', 'admin');
    expect(ok.statusCode).toBe(200);
    expect(ok.json().review.selfReview).toBe(false);
  });
});

describe('duplicates and retries', () => {
  it('a second upload of the same bytes is 409 naming the first test; allowDuplicate=true stores it and the audit log says so', async () => {
    const t = await withVessel();
    const first = await upload(t, t.vesselId, GOOD_LOG);
    const again = await upload(t, t.vesselId, GOOD_LOG);
    expect(again.statusCode).toBe(409);
    expect(again.json().existingTestId).toBe(first.json().test.id);
    expect(again.json().detail).toContain(`test ${first.json().test.id}`);
    expect(await count(t, 'drain_tests')).toBe(1);
    const allowed = await upload(t, t.vesselId, GOOD_LOG, { allowDuplicate: 'true' });
    expect(allowed.statusCode).toBe(201);
    const entry = (
      await t.app.inject({
        method: 'GET',
        url: `/api/audit?entityType=test&entityId=${allowed.json().test.id}&action=test.upload`,
        headers: t.auth('auditor'),
      })
    ).json().items[0];
    expect(entry.after).toMatchObject({ allowDuplicate: true, duplicateOf: first.json().test.id });
  });

  it('a retried upload with the same Idempotency-Key answers the first result and stores one test', async () => {
    const t = await withVessel();
    const key = { 'idempotency-key': 'upload-7f3a' };
    const a = await upload(t, t.vesselId, logN(5), {}, 'technician', key);
    const b = await upload(t, t.vesselId, logN(5), {}, 'technician', key);
    expect(a.statusCode).toBe(201);
    expect(b.statusCode).toBe(201);
    expect(b.headers['idempotency-replayed']).toBe('true');
    expect(b.json()).toEqual(a.json());
    expect(await count(t, 'drain_tests')).toBe(1);
    expect(await count(t, 'fits')).toBe(1);
    // the same key with other bytes is refused; another person's same key is theirs
    const other = await upload(t, t.vesselId, logN(6), {}, 'technician', key);
    expect(other.statusCode).toBe(422);
    expect(other.json().field).toBe('Idempotency-Key');
    expect((await upload(t, t.vesselId, logN(6), {}, 'engineer', key)).statusCode).toBe(201);
    expect(await count(t, 'drain_tests')).toBe(2);
  });
});

describe('people, tokens and revocation', () => {
  async function signIn(t: TestApp, token: string): Promise<string> {
    const s = await t.app.inject({ method: 'POST', url: '/api/session', payload: { token } });
    expect(s.statusCode).toBe(201);
    return String(s.headers['set-cookie']).split(';')[0];
  }
  const whoami = (t: TestApp, cookie: string) =>
    t.app.inject({ method: 'GET', url: '/api/session', headers: { cookie } });

  it('an admin adds a person limited to a site, gives a token, changes the role; revoking the token ends the session at once', async () => {
    const t = await testApp();
    const p = await t.app.inject({
      method: 'POST',
      url: '/api/people',
      headers: t.auth('admin'),
      payload: { name: 'J. Carrow (fictional)', role: 'technician', sites: ['north'] },
    });
    expect(p.statusCode).toBe(201);
    expect(p.json()).toMatchObject({ role: 'technician', sites: ['north'], revokedAt: null });
    const tok = await t.app.inject({
      method: 'POST',
      url: `/api/people/${p.json().id}/tokens`,
      headers: t.auth('admin'),
      payload: { label: 'tablet' },
    });
    expect(tok.statusCode).toBe(201);
    const cookie = await signIn(t, tok.json().token);
    expect((await whoami(t, cookie)).json().user).toMatchObject({
      role: 'technician',
      sites: ['north'],
    });
    await t.app.inject({
      method: 'PATCH',
      url: `/api/people/${p.json().id}`,
      headers: t.auth('admin'),
      payload: { role: 'engineer' },
    });
    expect((await whoami(t, cookie)).json().user.role).toBe('engineer'); // at once, same session
    const list = await t.app.inject({
      method: 'GET',
      url: `/api/tokens?personId=${p.json().id}`,
      headers: t.auth('admin'),
    });
    expect(list.json().items).toHaveLength(1);
    expect(JSON.stringify(list.json())).not.toContain(tok.json().token);
    const revoked = await t.app.inject({
      method: 'DELETE',
      url: `/api/tokens/${tok.json().tokenId}`,
      headers: t.auth('admin'),
    });
    expect(revoked.statusCode).toBe(200);
    expect((await whoami(t, cookie)).statusCode).toBe(401);
    expect(
      (
        await t.app.inject({
          method: 'GET',
          url: '/api/vessels',
          headers: { authorization: `Bearer ${tok.json().token}` },
        })
      ).statusCode,
    ).toBe(401);
  });

  it('revoking a person ends every open session and token at once; the last unlimited admin cannot be revoked', async () => {
    const t = await testApp();
    const eng = await t.store.users.personByName('engineer-1');
    const cookie = await signIn(t, t.tokens.engineer);
    expect((await whoami(t, cookie)).statusCode).toBe(200);
    const r = await t.app.inject({
      method: 'POST',
      url: `/api/people/${eng.id}/revoke`,
      headers: t.auth('admin'),
    });
    expect(r.statusCode).toBe(200);
    expect(r.json().revokedAt).not.toBeNull();
    expect((await whoami(t, cookie)).statusCode).toBe(401);
    expect(
      (await t.app.inject({ method: 'GET', url: '/api/vessels', headers: t.auth('engineer') }))
        .statusCode,
    ).toBe(401);
    const admin = await t.store.users.personByName('admin-1');
    const last = await t.app.inject({
      method: 'POST',
      url: `/api/people/${admin.id}/revoke`,
      headers: t.auth('admin'),
    });
    expect(last.statusCode).toBe(409);
    const audit = (
      await t.app.inject({
        method: 'GET',
        url: '/api/audit?action=user.revoke',
        headers: t.auth('auditor'),
      })
    ).json().items;
    expect(audit[0].after.sessionsEnded).toBe(1);
  });

  it('people management is for admins with no site limit', async () => {
    const t = await testApp();
    const limited = await t.store.users.addPerson(
      { id: null, name: 'system' },
      'K. Moss (fictional)',
      'admin',
      ['north'],
    );
    const token = (await t.store.users.createTokenFor({ id: null, name: 'system' }, limited.id))
      .token;
    const res = await t.app.inject({
      method: 'GET',
      url: '/api/people',
      headers: { authorization: `Bearer ${token}` },
    });
    expect(res.statusCode).toBe(403);
    expect(res.json().detail).toMatch(/no site limit/);
    expect(
      (await t.app.inject({ method: 'GET', url: '/api/people', headers: t.auth('engineer') }))
        .statusCode,
    ).toBe(403);
  });
});
