/** GET /api/fits/:id/people: the fit page's names for the uploader, the fit's author and its reviewer. */
import { describe, expect, it } from 'vitest';
import { GOOD_LOG, multipart, testApp } from './helpers.js';
import { VESSEL_FILE } from './helpers.js';

describe('GET /api/fits/:id/people', () => {
  it('names the people, not their ids; the reviewer only once reviewed', async () => {
    const t = await testApp();
    const v = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: VESSEL_FILE,
    });
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }], {
      operator: 'K. Marlow (fictional)',
    });
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(up.statusCode).toBe(201);
    const fitId = up.json().fit.id;
    const get = () =>
      t.app.inject({ method: 'GET', url: `/api/fits/${fitId}/people`, headers: t.auth('auditor') });
    // testApp names each role's person "<role>-1"
    expect((await get()).json()).toEqual({
      operator: 'K. Marlow (fictional)',
      uploadedBy: 'technician-1',
      fittedBy: 'technician-1',
      reviewedBy: null,
    });
    const review = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${fitId}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve', comment: 'checked' },
    });
    expect(review.statusCode).toBe(200);
    expect((await get()).json().reviewedBy).toBe('engineer-1');
    expect(
      (
        await t.app.inject({
          method: 'GET',
          url: '/api/fits/999/people',
          headers: t.auth('auditor'),
        })
      ).statusCode,
    ).toBe(404);
  });
});
