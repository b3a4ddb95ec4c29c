/**
 * Issue 19 scopes 5 and 7 through the API: two invented Kestrel Fen FB-1 drain tests (sample-data/)
 * fitted by the real engine and compared (GET /api/outlets/:id/compare), E_n worked by hand from
 * the two stored fits; the raw logger file downloaded byte for byte; the audit log newest first
 * and filtered by action.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { multipart, testApp, type TestApp } from './helpers.js';

const sample = (name: string) =>
  fileURLToPath(new URL(`../../sample-data/${name}`, import.meta.url));
const vesselFile = JSON.parse(readFileSync(sample('backwash-tank-fb1.vessel.json'), 'utf8'));
const LOGS: { name: string; fields: Record<string, string> }[] = [
  { name: 'fb1-2026-03-10-preamble.csv', fields: { testedAt: '2026-03-10T08:15:00Z' } },
  {
    name: 'fb1-2026-03-26-leaking-inlet.csv',
    fields: { testedAt: '2026-03-26T08:00:00Z', fitInflow: 'true' },
  },
];

let t: TestApp;
let outletId = 0;
const tests: { id: number; fitId: number; bytes: Buffer; name: string }[] = [];

beforeAll(async () => {
  t = await testApp({ analyze: async (req) => analyzeDrainTest(req) });
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: vesselFile,
  });
  expect(v.statusCode).toBe(201);
  outletId = v.json().outlets[0].id;
  for (const log of LOGS) {
    const bytes = readFileSync(sample(log.name));
    const m = multipart([{ field: 'log', name: log.name, bytes }], log.fields);
    const up = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.json().id}/tests`,
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(up.statusCode, up.body).toBe(201);
    tests.push({ id: up.json().test.id, fitId: up.json().fit.id, bytes, name: log.name });
  }
  // the first is approved: the comparison takes each test's fit in force
  const review = await t.app.inject({
    method: 'POST',
    url: `/api/fits/${tests[0].fitId}/review`,
    headers: t.auth('engineer'),
    payload: { decision: 'approve', comment: 'checked (fictional)' },
  });
  expect(review.statusCode).toBe(200);
}, 120_000);

describe('two FB-1 tests side by side', () => {
  it('answers each fit, its curve against head, and E_n as worked by hand from the two fits', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/compare?tests=${tests[0].id},${tests[1].id}`,
      headers: t.auth('auditor'),
    });
    expect(res.statusCode, res.body).toBe(200);
    const c = res.json();
    expect(c.tests.map((x: { fitId: number }) => x.fitId)).toEqual(tests.map((x) => x.fitId));
    expect(c.tests[0].fitStatus).toBe('approved');
    // E_n from the stored fits, read independently: (x₁ − x₂) / √(U₁² + U₂²), ISO/IEC 17043 Annex B
    const fits = await Promise.all(
      tests.map(async (x) =>
        (
          await t.app.inject({
            method: 'GET',
            url: `/api/fits/${x.fitId}`,
            headers: t.auth('auditor'),
          })
        ).json(),
      ),
    );
    const [a, b] = fits.map((f) => f.result.effectiveAreaM2);
    const en =
      (a.value - b.value) / Math.sqrt(a.expandedUncertainty ** 2 + b.expandedUncertainty ** 2);
    expect(c.pairs).toHaveLength(1);
    expect(c.pairs[0].effectiveArea.en).toBeCloseTo(en, 12);
    expect(c.pairs[0].effectiveArea.agree).toBe(Math.abs(en) <= 1);
    const [p, q] = fits.map((f) => f.result.dischargeCoefficient);
    expect(c.pairs[0].dischargeCoefficient.en).toBeCloseTo(
      (p.value - q.value) / Math.hypot(p.expandedUncertainty, q.expandedUncertainty),
      12,
    );
    // FB-1's sensor zero is at the drain centreline: head = reading; each curve passes the
    // reference head at elapsed time 0 (within the 1 mm the fitted curve falls in a few seconds)
    expect(c.referenceHeadM).toBeGreaterThan(1);
    for (const x of c.tests) {
      expect(x.headOffsetM).toBeCloseTo(0, 12);
      const i = x.curve.elapsedS.findIndex((s: number) => s >= 0);
      expect(Math.abs(x.curve.fittedHeadM[i] - c.referenceHeadM)).toBeLessThan(0.005);
      expect(x.curve.headM.length).toBe(x.curve.elapsedS.length);
    }
  });

  it('refuses one test, a test of another outlet and an unknown test alike, naming tests', async () => {
    for (const q of [`${tests[0].id}`, `${tests[0].id},99999`, `${tests[0].id},${tests[0].id}`]) {
      const res = await t.app.inject({
        method: 'GET',
        url: `/api/outlets/${outletId}/compare?tests=${q}`,
        headers: t.auth('technician'),
      });
      expect(res.statusCode, q).toBe(422);
      expect(res.json().detail).toMatch(/^tests: /);
    }
    const bad = await t.app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/compare?tests=1;2`,
      headers: t.auth('technician'),
    });
    expect(bad.statusCode).toBe(400);
  });
});

describe('what an auditor needs to hand', () => {
  it('the raw logger file: the exact uploaded bytes under the original name', async () => {
    for (const x of tests) {
      const res = await t.app.inject({
        method: 'GET',
        url: `/api/tests/${x.id}/raw`,
        headers: t.auth('auditor'),
      });
      expect(res.statusCode).toBe(200);
      const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');
      expect(sha(res.rawPayload)).toBe(sha(x.bytes));
      expect(res.headers['x-content-sha256']).toBe(sha(x.bytes));
      expect(res.headers['content-disposition']).toBe(
        `attachment; filename="${x.name}"; filename*=UTF-8''${x.name}`,
      );
    }
  });

  it('the audit log newest first, paged with beforeSeq, and filtered by action', async () => {
    const get = async (q: string) => {
      const res = await t.app.inject({
        method: 'GET',
        url: `/api/audit?${q}`,
        headers: t.auth('auditor'),
      });
      expect(res.statusCode, res.body).toBe(200);
      return res.json();
    };
    const oldest = await get('limit=1000');
    const all = oldest.items.map((e: { seq: number }) => e.seq);
    const first = await get('order=newest&limit=3');
    expect(first.items.map((e: { seq: number }) => e.seq)).toEqual(all.slice(-3).reverse());
    expect(first.nextAfterSeq).toBeNull();
    const second = await get(`order=newest&limit=3&beforeSeq=${first.nextBeforeSeq}`);
    expect(second.items.map((e: { seq: number }) => e.seq)).toEqual(all.slice(-6, -3).reverse());
    const uploads = await get('order=newest&action=test.upload');
    expect(uploads.items.map((e: { action: string }) => e.action)).toEqual([
      'test.upload',
      'test.upload',
    ]);
    // names, not ids: the uploader as recorded
    expect(uploads.items[0].actorName).toBe('technician-1');
    expect(uploads.items[0].seq).toBeGreaterThan(uploads.items[1].seq);
    expect(uploads.nextBeforeSeq).toBeNull();
  });
});
