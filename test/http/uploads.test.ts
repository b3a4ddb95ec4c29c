import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../server/core/errors.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from './helpers.js';
import { seededRandom } from '../../server/core/random/prng.js';

const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

async function withVessel(over: Parameters<typeof testApp>[0] = {}, vessel: object = VESSEL_FILE) {
  const t = await testApp(over);
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: vessel,
  });
  expect(v.statusCode).toBe(201);
  return { ...t, vesselId: v.json().id as number, vessel: v.json() };
}

function upload(
  t: TestApp,
  vesselId: number,
  files: Parameters<typeof multipart>[0],
  fields: Record<string, string> = {},
) {
  const m = multipart(files, fields);
  return t.app.inject({
    method: 'POST',
    url: `/api/vessels/${vesselId}/tests`,
    headers: { ...t.auth('technician'), ...m.headers },
    payload: m.payload,
  });
}

async function counts(t: TestApp) {
  const one = async (sql: string) => Number(await t.store.sql.value(sql));
  return {
    tests: await one('SELECT count(*) FROM drain_tests'),
    raw: await one('SELECT count(*) FROM raw_files'),
    fits: await one('SELECT count(*) FROM fits'),
  };
}

describe('POST /api/vessels/:id/tests', () => {
  it('stores the bytes, fits them, answers 201 {test, fit}; the raw download is byte-identical', async () => {
    const t = await withVessel();
    const log = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), GOOD_LOG, Buffer.from('\r\n')]); // BOM and CRLF kept as sent
    const res = await upload(t, t.vesselId, [{ field: 'log', name: 'Prüfung 3.csv', bytes: log }], {
      fitInflow: 'true',
      dateOrder: 'dmy',
      window: '1..3',
      operator: 'op-7',
      loggerId: 'LG-2',
      testedAt: '2026-03-01T08:00:00Z',
      notes: 'after cleaning',
    });
    expect(res.statusCode).toBe(201);
    const { test, fit } = res.json();
    expect(test).toMatchObject({
      sha256: sha(log),
      size: log.length,
      fileName: 'Prüfung 3.csv',
      status: 'analysed',
      operator: 'op-7',
      loggerId: 'LG-2',
    });
    expect(test.settings).toEqual({ fitInflow: true, dateOrder: 'dmy', window: '1..3' });
    expect(fit).toMatchObject({
      testId: test.id,
      status: 'draft',
      engineVersion: 'fake-1',
      supersededBy: null,
    });
    expect(fit.result.window_setting).toBe('1..3'); // the settings reached the analysis
    expect(fit.vessel).toEqual(VESSEL_FILE);

    const raw = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${test.id}/raw`,
      headers: t.auth('auditor'),
    });
    expect(raw.statusCode).toBe(200);
    expect(Buffer.compare(raw.rawPayload, log)).toBe(0);
    expect(raw.headers['content-disposition']).toContain(
      `filename*=UTF-8''${encodeURIComponent('Prüfung 3.csv')}`,
    );
    expect(
      (
        await t.app.inject({
          method: 'GET',
          url: `/api/fits/${fit.id}`,
          headers: t.auth('technician'),
        })
      ).json(),
    ).toEqual(fit);
  });

  it('keeps the barometric file too', async () => {
    const t = await withVessel();
    const baro = Buffer.from('t,p_kpa\n0,101.3\n');
    const res = await upload(t, t.vesselId, [
      { field: 'log', name: 'a.csv', bytes: GOOD_LOG },
      { field: 'baro', name: 'b.csv', bytes: baro },
    ]);
    expect(res.statusCode).toBe(201);
    expect(res.json().test.baro).toEqual({
      sha256: sha(baro),
      fileName: 'b.csv',
      size: baro.length,
    });
    const raw = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${res.json().test.id}/raw?file=baro`,
      headers: t.auth('technician'),
    });
    expect(Buffer.compare(raw.rawPayload, baro)).toBe(0);
  });

  it('a refused file: 422 problem+json naming file, line and field, and nothing kept', async () => {
    const t = await withVessel();
    const res = await upload(t, t.vesselId, [
      { field: 'log', name: 'bad.csv', bytes: Buffer.from('t,level\n0,2.0\n1,abc\n') },
    ]);
    expect(res.statusCode).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.json()).toMatchObject({
      status: 422,
      file: 'bad.csv',
      line: 3,
      field: 'level',
      instance: `/api/vessels/${t.vesselId}/tests`,
    });
    expect(res.body).not.toMatch(/at .*\.ts:\d+/);
    expect(await counts(t)).toEqual({ tests: 0, raw: 0, fits: 0 });
    expect((await t.store.audit.verify()).ok).toBe(true);
  });

  it.each([
    ['no log file', [], {}, 'log'],
    ['an unknown file field', [{ field: 'other', name: 'x', bytes: GOOD_LOG }], {}, 'other'],
    ['an empty log', [{ field: 'log', name: 'e.csv', bytes: Buffer.alloc(0) }], {}, 'log'],
    [
      'a bad setting',
      [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }],
      { dateOrder: 'yyy' },
      'dateOrder',
    ],
    [
      'a bad boolean',
      [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }],
      { fitInflow: 'yes' },
      'fitInflow',
    ],
    [
      'an unknown field',
      [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }],
      { colour: 'red' },
      'colour',
    ],
  ] as const)(
    '%s: 400 problem+json with the path, nothing stored',
    async (_label, files, fields, path) => {
      const t = await withVessel();
      const res = await upload(t, t.vesselId, [...files], fields);
      expect(res.statusCode).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(
        res
          .json()
          .errors.map((e: { path: string }) => e.path)
          .join(' '),
      ).toContain(path);
      expect(await counts(t)).toEqual({ tests: 0, raw: 0, fits: 0 });
    },
  );

  it('over the size limit: 413, nothing stored', async () => {
    const t = await withVessel({ uploadLimitBytes: 1024 });
    const big = Buffer.from('t,level\n' + '1,2.0\n'.repeat(400));
    const res = await upload(t, t.vesselId, [{ field: 'log', name: 'big.csv', bytes: big }]);
    expect(res.statusCode).toBe(413);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(await counts(t)).toEqual({ tests: 0, raw: 0, fits: 0 });
  });

  it('not multipart: 415; unknown vessel: 404', async () => {
    const t = await withVessel();
    const a = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${t.vesselId}/tests`,
      headers: t.auth('technician'),
      payload: { log: 'x' },
    });
    expect(a.statusCode).toBe(415);
    const m = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    const b = await t.app.inject({
      method: 'POST',
      url: '/api/vessels/999/tests',
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(b.statusCode).toBe(404);
    expect((await counts(t)).tests).toBe(0);
  });

  it('a vessel with several outlets needs outletId; the analysis sees only that outlet', async () => {
    const two = {
      ...VESSEL_FILE,
      outlet: undefined,
      outlets: [
        { id: 'low', boreM: 0.03, elevationM: 0, actionThreshold: 0.8 },
        { id: 'high', boreM: 0.05, elevationM: 1 },
      ],
    };
    const t = await withVessel({}, two);
    const none = await upload(t, t.vesselId, [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    expect(none.statusCode).toBe(422);
    expect(none.json().field).toBe('outletId');
    const high = t.vessel.outlets.find((o: { key: string }) => o.key === 'high');
    const ok = await upload(t, t.vesselId, [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }], {
      outletId: String(high.id),
    });
    expect(ok.statusCode).toBe(201);
    expect(ok.json().fit.vessel.outlet).toEqual({ id: 'high', boreM: 0.05, elevationM: 1 });
    expect(ok.json().fit.vessel.outlets).toBeUndefined();
    expect(ok.json().test.outletId).toBe(high.id);
    expect(t.vessel.outlets.find((o: { key: string }) => o.key === 'low').actionThreshold).toBe(
      0.8,
    );
  });

  it('an engine failure that is not the input: 500 without a stack, the upload kept pending', async () => {
    const t = await withVessel({
      analyze: async () => {
        throw new Error('solver blew up at /secret/path.ts:12');
      },
    });
    const res = await upload(t, t.vesselId, [{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }]);
    expect(res.statusCode).toBe(500);
    expect(res.body).not.toContain('secret');
    expect((await t.store.tests.pending()).length).toBe(1);
  });

  it('50 concurrent uploads are all stored, none lost, the chain intact', async () => {
    const delays = seededRandom(50);
    const t = await withVessel({
      analyze: async (req) => {
        await new Promise((r) => setTimeout(r, delays.uniform() * 5)); // finish out of order, reproducibly
        return (await import('./fake-analyze.js')).analyzeDrainTest(req);
      },
    });
    const bodies = Array.from({ length: 50 }, (_, i) =>
      Buffer.from(`t,level\n0,2.0\n1,1.9\n2,1.${i}\n`),
    );
    const answers = await Promise.all(
      bodies.map((b, i) => upload(t, t.vesselId, [{ field: 'log', name: `u${i}.csv`, bytes: b }])),
    );
    expect(answers.map((a) => a.statusCode)).toEqual(Array(50).fill(201));
    expect(new Set(answers.map((a) => a.json().test.id)).size).toBe(50);
    answers.forEach((a, i) => expect(a.json().test.sha256).toBe(sha(bodies[i])));
    expect(await counts(t)).toEqual({ tests: 50, raw: 50, fits: 50 });
    expect(await t.store.audit.verify()).toMatchObject({ ok: true });
    const page = await t.app.inject({
      method: 'GET',
      url: `/api/vessels/${t.vesselId}/tests?limit=20&offset=40`,
      headers: t.auth('auditor'),
    });
    expect(page.json()).toMatchObject({ total: 50, limit: 20, offset: 40 });
    expect(page.json().items.length).toBe(10);
  });
});

describe('InputError stays an InputError', () => {
  it('is a 422 even when thrown by an injected runner', async () => {
    const t = await withVessel({
      analyze: async () => {
        throw new InputError('no level column', { file: 'x.csv', line: 1, field: 'level' });
      },
    });
    const res = await upload(t, t.vesselId, [{ field: 'log', name: 'x.csv', bytes: GOOD_LOG }]);
    expect(res.json()).toMatchObject({
      status: 422,
      detail: 'x.csv, line 1, field level: no level column',
    });
  });
});
