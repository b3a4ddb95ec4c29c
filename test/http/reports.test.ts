import { createHash } from 'node:crypto';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../server/http/app.js';
import { readReportFile } from '../../server/render/report-file.js';
import { readZip } from '../../server/render/zip.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import type { Role } from '../../server/store/users.js';
import { reportFixture } from '../render/report-fixture.js';
import { fakeAnalyze } from './fake-analyze.js';

let app: FastifyInstance;
let store: Store;
let fitId: number;
let outletId: number;
const tokens = {} as Record<Role, string>;
const auth = (role: Role) => ({ authorization: `Bearer ${tokens[role]}` });

beforeAll(async () => {
  const fx = await reportFixture(); // the demo's invented backwash tank (sample-data/, fictional)
  ({ store, fitId, outletId } = fx);
  for (const role of ['technician', 'engineer', 'auditor', 'admin'] as Role[])
    tokens[role] = (await store.users.createToken(SYSTEM_ACTOR, `${role}-http`, role)).token;
  app = await buildApp({ store, analyze: fakeAnalyze });
  await app.ready();
}, 60_000);
afterAll(async () => {
  await app?.close();
  await store?.close();
});

describe('report routes', () => {
  it('serves the fit report as PDF and JSON with the same id, to every role', async () => {
    for (const role of ['technician', 'auditor'] as Role[]) {
      const pdf = await app.inject({
        method: 'GET',
        url: `/api/fits/${fitId}/report.pdf`,
        headers: auth(role),
      });
      expect(pdf.statusCode).toBe(200);
      expect(pdf.headers['content-type']).toMatch(/application\/pdf/);
      const file = readReportFile(pdf.rawPayload, 'r.pdf');
      const json = await app.inject({
        method: 'GET',
        url: `/api/fits/${fitId}/report.json`,
        headers: auth(role),
      });
      expect(json.json().reportId).toBe(file.reportId);
      expect(pdf.headers['x-report-id']).toBe(file.reportId);
    }
    const again = await app.inject({
      method: 'GET',
      url: `/api/fits/${fitId}/report.pdf`,
      headers: auth('engineer'),
    });
    const first = await app.inject({
      method: 'GET',
      url: `/api/fits/${fitId}/report.pdf`,
      headers: auth('admin'),
    });
    expect(createHash('sha256').update(again.rawPayload).digest('hex')).toBe(
      createHash('sha256').update(first.rawPayload).digest('hex'),
    );
  }, 30_000);

  it('refuses callers who are not signed in, and unknown fits with problem+json', async () => {
    expect(
      (await app.inject({ method: 'GET', url: `/api/fits/${fitId}/report.pdf` })).statusCode,
    ).toBe(401);
    const missing = await app.inject({
      method: 'GET',
      url: '/api/fits/999/report.pdf',
      headers: auth('auditor'),
    });
    expect(missing.statusCode).toBe(404);
    expect(missing.headers['content-type']).toMatch(/problem\+json/);
  });

  it('serves the outlet report, and exports to auditors but not technicians', async () => {
    const o = await app.inject({
      method: 'GET',
      url: `/api/outlets/${outletId}/report.pdf`,
      headers: auth('technician'),
    });
    expect(o.statusCode).toBe(200);
    expect(readReportFile(o.rawPayload, 'o.pdf').kind).toBe('outlet');
    expect(
      (
        await app.inject({
          method: 'POST',
          url: '/api/exports',
          headers: auth('technician'),
          payload: {},
        })
      ).statusCode,
    ).toBe(403);
    const started = await app.inject({
      method: 'POST',
      url: '/api/exports',
      headers: auth('auditor'),
      payload: { from: '2026-03-01', to: '2026-03-31' },
    });
    expect(started.statusCode).toBe(202);
    expect(started.headers.location).toBe(`/api/exports/${started.json().id}`);
    let job = started.json();
    while (job.state === 'running') {
      await new Promise((r) => setTimeout(r, 50));
      job = (
        await app.inject({ method: 'GET', url: job.statusUrl, headers: auth('auditor') })
      ).json();
    }
    expect(job).toMatchObject({ state: 'done', done: 1, total: 1, error: null });
    const z = await app.inject({ method: 'GET', url: job.archiveUrl, headers: auth('auditor') });
    expect(z.statusCode).toBe(200);
    expect(z.headers['content-type']).toBe('application/zip');
    expect(z.rawPayload.length).toBe(job.bytes);
    expect(readZip(z.rawPayload).map((e) => e.name)).toContain('manifest.json');
    const none = await app.inject({
      method: 'POST',
      url: '/api/exports',
      headers: auth('auditor'),
      payload: { from: '2020-01-01', to: '2020-01-02' },
    });
    expect(none.statusCode).toBe(422);
  }, 30_000);
});
