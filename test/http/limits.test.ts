/**
 * Every free-text and name field has a maximum length (server/core/limits.ts) and refuses more
 * with 422 naming the field. Two walks: the OpenAPI document (every JSON body, query and path
 * string of every route) and the schemas the OpenAPI cannot show (vessel file, multipart upload
 * fields, the system fit's multipart fields); then one refusal through HTTP of each kind.
 */
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { TEXT_LIMITS } from '../../server/core/limits.js';
import { vesselSchema } from '../../server/core/vessel/schema.js';
import { fitFields } from '../../server/http/routes/systems.js';
import { uploadFields } from '../../server/http/uploads.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from './helpers.js';

type Schema = Record<string, unknown>;

/** Every string schema under `s` that has no maxLength and is not an enum, a constant or a date/time format. */
function unbounded(s: unknown, path: string, defs: Record<string, unknown> = {}): string[] {
  if (s === null || typeof s !== 'object') return [];
  const o = s as Schema;
  if (typeof o.$ref === 'string') {
    const name = o.$ref.split('/').pop()!;
    return name in defs ? unbounded(defs[name], path, {}) : [];
  }
  const out: string[] = [];
  const types = [o.type].flat();
  if (
    types.includes('string') &&
    o.maxLength === undefined &&
    o.enum === undefined &&
    o.const === undefined &&
    o.format === undefined
  )
    out.push(path);
  for (const [k, v] of Object.entries((o.properties as Record<string, unknown>) ?? {}))
    out.push(...unbounded(v, `${path}.${k}`, defs));
  for (const key of ['anyOf', 'oneOf', 'allOf'] as const)
    for (const [i, v] of ((o[key] as unknown[]) ?? []).entries())
      out.push(...unbounded(v, `${path}|${i}`, defs));
  if (o.items) out.push(...unbounded(o.items, `${path}[]`, defs));
  return out;
}

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(async () => {
  await t.app.close();
});

describe('every request string has a maximum length', () => {
  it('in the OpenAPI document of every route (JSON bodies, query strings, path parameters)', async () => {
    const doc = (await t.app.inject({ method: 'GET', url: '/api/openapi.json' })).json() as {
      paths: Record<string, Record<string, any>>;
      components?: { schemas?: Record<string, unknown> };
    };
    const defs = doc.components?.schemas ?? {};
    const found: string[] = [];
    let walked = 0;
    for (const [url, ops] of Object.entries(doc.paths)) {
      for (const [method, op] of Object.entries(ops)) {
        for (const p of op.parameters ?? []) {
          walked++;
          found.push(
            ...unbounded(p.schema, `${method.toUpperCase()} ${url} ${p.in}.${p.name}`, defs),
          );
        }
        const body = op.requestBody?.content?.['application/json']?.schema;
        if (body) {
          walked++;
          found.push(...unbounded(body, `${method.toUpperCase()} ${url} body`, defs));
        }
      }
    }
    expect(walked).toBeGreaterThan(20);
    expect(found).toEqual([]);
  });

  it('in the vessel file, the upload fields and the system fit fields', () => {
    for (const [name, schema] of [
      ['vessel file', vesselSchema],
      ['upload fields', uploadFields],
      ['system fit fields', fitFields],
    ] as const) {
      const json = z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any' });
      expect(unbounded(json, name, (json as { $defs?: Record<string, unknown> }).$defs)).toEqual(
        [],
      );
    }
  });
});

const long = (kind: keyof typeof TEXT_LIMITS) => 'x'.repeat(TEXT_LIMITS[kind] + 1);

describe('a field past its limit answers 422 naming it, and nothing is stored', () => {
  it('vessel file: name, site, notes, outlet id', async () => {
    for (const [field, body] of [
      ['name', { ...VESSEL_FILE, name: long('name') }],
      ['site', { ...VESSEL_FILE, site: long('name') }],
      ['notes', { ...VESSEL_FILE, notes: long('note') }],
      ['outlet.id', { ...VESSEL_FILE, outlet: { ...VESSEL_FILE.outlet, id: long('tag') } }],
    ] as const) {
      const res = await t.app.inject({
        method: 'POST',
        url: '/api/vessels',
        headers: t.auth('engineer'),
        payload: body,
      });
      expect(res.statusCode, field).toBe(422);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(res.json().field).toBe(field);
      expect(res.body.length).toBeLessThan(2000); // the value is not echoed back
    }
    expect((await t.store.vessels.list(10, 0)).total).toBe(0);
    // at the limit it is accepted
    const ok = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: { ...VESSEL_FILE, name: 'n'.repeat(TEXT_LIMITS.name) },
    });
    expect(ok.statusCode).toBe(201);
  });

  it('upload text fields: notes, operator, loggerId, unit', async () => {
    const v = (await t.store.vessels.list(10, 0)).items[0];
    for (const [field, value] of [
      ['notes', long('note')],
      ['operator', long('name')],
      ['loggerId', long('name')],
      ['unit', long('tag')],
    ] as const) {
      const body = multipart([{ field: 'log', name: 'a.csv', bytes: GOOD_LOG }], {
        [field]: value,
      });
      const res = await t.app.inject({
        method: 'POST',
        url: `/api/vessels/${v.id}/tests`,
        headers: { ...t.auth('technician'), ...body.headers },
        payload: body.payload,
      });
      expect(res.statusCode, field).toBe(422);
      expect(res.json().type).toBe('urn:efflux:problem:too-long');
      expect(res.json().field).toBe(field);
    }
    expect((await t.store.tests.listByVessel(v.id, 10, 0)).total).toBe(0);
  });

  it('review comment, maintenance notes, export selection, audit filter', async () => {
    const v = (await t.store.vessels.list(10, 0)).items[0];
    const review = await t.app.inject({
      method: 'POST',
      url: '/api/fits/1/review',
      headers: t.auth('engineer'),
      payload: { decision: 'approve', comment: long('note') },
    });
    expect(review.statusCode).toBe(422);
    expect(review.json().field).toBe('body.comment');
    const event = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${v.id}/events`,
      headers: t.auth('engineer'),
      payload: { kind: 'cleaned', occurredAt: '2026-05-01', notes: long('note') },
    });
    expect(event.statusCode).toBe(422);
    expect(event.json().field).toBe('body.notes');
    const exp = await t.app.inject({
      method: 'POST',
      url: '/api/exports',
      headers: t.auth('auditor'),
      payload: { site: long('name') },
    });
    expect(exp.statusCode).toBe(422);
    expect(exp.json().field).toBe('body.site');
    const audit = await t.app.inject({
      method: 'GET',
      url: `/api/audit?action=${long('tag')}`,
      headers: t.auth('auditor'),
    });
    expect(audit.statusCode).toBe(422);
    expect(audit.json().field).toBe('querystring.action');
    // a structural error and a long one together stay a 400 listing both
    const both = await t.app.inject({
      method: 'POST',
      url: '/api/fits/1/review',
      headers: t.auth('engineer'),
      payload: { decision: 'maybe', comment: long('note') },
    });
    expect(both.statusCode).toBe(400);
    expect(both.json().errors).toHaveLength(2);
  });

  it('system file: name, notes, vessel id (steady), and the system fit fields (multipart)', async () => {
    const system = JSON.parse(
      readFileSync(
        new URL('../../sample-data/systems/filter-chain.system.json', import.meta.url),
        'utf8',
      ),
    );
    system.vessels.forEach((v: Record<string, unknown>) => (v.effectiveAreaM2 = 0.001));
    for (const [field, edit] of [
      ['name', (s: any) => (s.name = long('name'))],
      ['notes', (s: any) => (s.notes = long('note'))],
      ['vessels.0.id', (s: any) => (s.vessels[0].id = long('tag'))],
      ['vessels.1.name', (s: any) => (s.vessels[1].name = long('name'))],
    ] as const) {
      const s = structuredClone(system);
      edit(s);
      const res = await t.app.inject({
        method: 'POST',
        url: '/api/systems/steady',
        headers: t.auth('engineer'),
        payload: { system: s, inflows: [{ flow: '1L/s' }] },
      });
      expect(res.statusCode, field).toBe(422);
      expect(res.json().field).toBe(field);
    }
    const body = multipart(
      [{ field: 'system', name: 's.json', bytes: Buffer.from(JSON.stringify(system)) }],
      { tz: long('tag') },
    );
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fit',
      headers: { ...t.auth('technician'), ...body.headers },
      payload: body.payload,
    });
    expect(res.statusCode).toBe(422);
    expect(res.json().field).toBe('tz');
  });
});
