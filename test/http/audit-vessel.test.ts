/** GET /api/audit?vesselId=N: the entries of one vessel and of its outlets, tests, fits and events, nothing of another vessel's. */
import { describe, expect, it } from 'vitest';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE } from './helpers.js';

describe('audit log filtered by vessel', () => {
  it('returns the vessel’s own trail (create, upload, fit, review, maintenance) and no other vessel’s', async () => {
    const t = await testApp();
    const ids: number[] = [];
    for (const name of ['T-1', 'T-2']) {
      const v = (
        await t.app.inject({
          method: 'POST',
          url: '/api/vessels',
          headers: t.auth('engineer'),
          payload: { ...VESSEL_FILE, name },
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
      await t.app.inject({
        method: 'POST',
        url: `/api/fits/${up.fit.id}/review`,
        headers: t.auth('engineer'),
        payload: { decision: 'approve' },
      });
      const ev = await t.app.inject({
        method: 'POST',
        url: `/api/vessels/${v.id}/events`,
        headers: t.auth('engineer'),
        payload: { kind: 'cleaned', occurredAt: '2026-01-02' },
      });
      expect(ev.statusCode, ev.body).toBe(201);
      ids.push(v.id);
    }
    const get = async (q: string) =>
      (
        await t.app.inject({ method: 'GET', url: `/api/audit?${q}`, headers: t.auth('auditor') })
      ).json().items as { entityType: string; entityId: string; action: string; seq: number }[];
    const all = await get('limit=1000');
    const one = await get(`vesselId=${ids[0]}&limit=1000`);
    const two = await get(`vesselId=${ids[1]}&limit=1000`);
    expect(one.map((e) => e.action)).toEqual(
      expect.arrayContaining(['vessel.create', 'test.upload', 'fit.create', 'event.create']),
    );
    expect(one.some((e) => e.entityType === 'fit' && /review|approve/.test(e.action))).toBe(true);
    // the two trails do not overlap, and together they are every vessel-related entry
    const seqs = new Set(one.map((e) => e.seq));
    expect(two.some((e) => seqs.has(e.seq))).toBe(false);
    const related = all.filter((e) =>
      ['vessel', 'outlet', 'test', 'fit', 'maintenance-event'].includes(e.entityType),
    );
    expect(one.length + two.length).toBe(related.length);
    // combined with another filter, and refused when not a number
    const fitsOnly = await get(`vesselId=${ids[0]}&entityType=fit`);
    expect(fitsOnly.length).toBeGreaterThan(0);
    expect(fitsOnly.every((e) => e.entityType === 'fit')).toBe(true);
    const bad = await t.app.inject({
      method: 'GET',
      url: '/api/audit?vesselId=abc',
      headers: t.auth('auditor'),
    });
    expect(bad.statusCode).toBe(400);
    expect(bad.json().errors[0].path).toBe('querystring.vesselId');
  });
});
