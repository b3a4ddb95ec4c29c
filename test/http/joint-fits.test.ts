/**
 * Joint fits kept as records over HTTP: the pump-fed sample system (a logged inflow) fitted and
 * stored with its files, listed per system, four eyes on approval, the audit entries, and the PDF
 * report checked as text. Truth: sample-data/systems/truth.json (the invented scenario's recorded
 * Cd, written by server/demo/systems.ts).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { havePoppler } from '../render/pdf-tools.js';
import { jointReportProblems, pdfPages } from '../render/joint-report-checks.js';
import { multipart, testApp, type TestApp } from './helpers.js';

const dir = fileURLToPath(new URL('../../sample-data/systems/', import.meta.url));
const file = (name: string) => readFileSync(dir + name);
const truth = JSON.parse(readFileSync(dir + 'truth.json', 'utf8')).tests.find(
  (t: { system: string }) => t.system === 'wash-transfer.system.json',
).truth;
const poppler = havePoppler();

let t: TestApp;
let second: string;
let stored: Record<string, any>;

const washBody = (fields: Record<string, string> = {}, withInflow = true) =>
  multipart(
    [
      {
        field: 'system',
        name: 'wash-transfer.system.json',
        bytes: file('wash-transfer.system.json'),
      },
      { field: 'log:WT4', name: 'wt4-2026-04-09.csv', bytes: file('wt4-2026-04-09.csv') },
      { field: 'log:HT5', name: 'ht5-2026-04-09.csv', bytes: file('ht5-2026-04-09.csv') },
      ...(withInflow
        ? [{ field: 'inflow:WT4', name: 'pump-2026-04-09.csv', bytes: file('pump-2026-04-09.csv') }]
        : []),
    ],
    fields,
  );

beforeAll(async () => {
  t = await testApp();
  second = (await t.store.users.createToken(SYSTEM_ACTOR, 'engineer-2 (fictional)', 'engineer'))
    .token;
  const m = washBody({ notes: 'pump cycling as usual' });
  const res = await t.app.inject({
    method: 'POST',
    url: '/api/systems/fits',
    headers: { ...t.auth('engineer'), ...m.headers },
    payload: m.payload,
  });
  expect(res.statusCode, res.body).toBe(201);
  stored = res.json();
}, 120_000);
afterAll(async () => t.app.close());

describe('POST /api/systems/fits', () => {
  it('stores a draft with the result, the settings, the drawing and every file byte for byte', async () => {
    expect(stored.status).toBe('draft');
    expect(stored.site).toBe('Kestrel Fen works (fictional)');
    expect(stored.systemName).toBe('Wash water transfer (fictional)');
    expect(stored.createdBy).toBe('engineer-1');
    expect(stored.notes).toBe('pump cycling as usual');
    for (const id of ['WT4', 'HT5']) {
      const [lo, hi] = stored.result.outlets[id].dischargeCoefficient.ci95;
      expect(truth[id].dischargeCoefficient, id).toBeGreaterThan(lo);
      expect(truth[id].dischargeCoefficient, id).toBeLessThan(hi);
    }
    expect(stored.drawing.map((d: { id: string }) => d.id).sort()).toEqual(['HT5', 'WT4']);
    expect(
      stored.files.map((f: { role: string; vessel: string }) => `${f.role}:${f.vessel}`),
    ).toEqual(['system:', 'level:HT5', 'level:WT4', 'inflow:WT4']);
    for (const [role, vessel, name] of [
      ['system', '', 'wash-transfer.system.json'],
      ['level', 'WT4', 'wt4-2026-04-09.csv'],
      ['inflow', 'WT4', 'pump-2026-04-09.csv'],
    ]) {
      const kept = await t.store.jointFits.file(stored.id, role as 'level', vessel);
      expect(kept.fileName).toBe(name);
      expect(Buffer.from(kept.bytes).equals(file(name))).toBe(true);
    }
    // the pump's average over the span, for the operating point: the pump is on 100 s of every
    // 240 s with 6 s ramps at 1.5 L/s (README of sample-data/systems), so about 1.5·106/240 ≈ 0.66 L/s
    const mean = stored.result.diagnostics.inflowLogs[0].meanM3S * 1000;
    expect(mean).toBeGreaterThan(0.5);
    expect(mean).toBeLessThan(0.8);
    const audit = await t.store.audit.list({
      entityType: 'joint-fit',
      entityId: String(stored.id),
    });
    expect(audit.map((e) => e.action)).toEqual(['joint-fit.create']);
  });

  it('refuses a missing inflow log naming its field, and a site outside the file’s', async () => {
    const m = washBody({}, false);
    const res = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fits',
      headers: { ...t.auth('technician'), ...m.headers },
      payload: m.payload,
    });
    expect(res.statusCode).toBe(422);
    expect(res.json().field).toBe('inflow:WT4');
    const m2 = washBody({ site: 'elsewhere' });
    const res2 = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fits',
      headers: { ...t.auth('technician'), ...m2.headers },
      payload: m2.payload,
    });
    expect(res2.statusCode).toBe(422);
    expect(res2.json().field).toBe('site');
  });
});

describe('joint fits listed, reviewed and reported', () => {
  it('lists per system', async () => {
    const all = await t.app.inject({
      method: 'GET',
      url: '/api/systems/fits',
      headers: t.auth('auditor'),
    });
    expect(all.json().items.map((i: { id: number }) => i.id)).toEqual([stored.id]);
    const other = await t.app.inject({
      method: 'GET',
      url: '/api/systems/fits?system=' + encodeURIComponent('Filter chain (fictional)'),
      headers: t.auth('auditor'),
    });
    expect(other.json().items).toEqual([]);
  });

  it('the draft’s PDF is marked DRAFT on every page, in words, each figure whole on its page', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: `/api/systems/fits/${stored.id}/report.pdf`,
      headers: t.auth('auditor'),
    });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    // kept for a look (test-output/ is not committed)
    const out = fileURLToPath(new URL('../../test-output/', import.meta.url));
    mkdirSync(out, { recursive: true });
    writeFileSync(out + 'joint-fit-draft.pdf', res.rawPayload);
    if (!poppler) return;
    const pages = pdfPages(res.rawPayload);
    expect(pages.length).toBeGreaterThan(1);
    expect(jointReportProblems(pages, { status: 'draft', figures: 2 })).toEqual([]);
    const text = pages.join('\n');
    expect(text).toMatch(/upright cylinder, diameter 1\.2 m, height 2\.5 m/);
    expect(text).toMatch(/into HT5 \(Holding tank HT-5\) as a free jet/);
    expect(text).toMatch(/logged by pump-2026-04-09\.csv into WT4/);
  });

  it('four eyes: the engineer who stored it may not approve it; another engineer may', async () => {
    const self = await t.app.inject({
      method: 'POST',
      url: `/api/systems/fits/${stored.id}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'approve' },
    });
    expect(self.statusCode).toBe(403);
    expect(self.json().detail).toMatch(/four eyes/);
    const ok = await t.app.inject({
      method: 'POST',
      url: `/api/systems/fits/${stored.id}/review`,
      headers: { authorization: `Bearer ${second}` },
      payload: { decision: 'approve', comment: 'checked against the pump log' },
    });
    expect(ok.statusCode, ok.body).toBe(200);
    expect(ok.json().status).toBe('approved');
    expect(ok.json().review.by).toBe('engineer-2 (fictional)');
    const again = await t.app.inject({
      method: 'POST',
      url: `/api/systems/fits/${stored.id}/review`,
      headers: { authorization: `Bearer ${second}` },
      payload: { decision: 'reject' },
    });
    expect(again.statusCode).toBe(409);
    const audit = await t.store.audit.list({
      entityType: 'joint-fit',
      entityId: String(stored.id),
    });
    expect(audit.map((e) => e.action)).toEqual(['joint-fit.create', 'joint-fit.approve']);
    expect((await t.store.audit.verify()).ok).toBe(true);
    // the record itself refuses a rewrite
    await expect(
      t.store.sql.run("UPDATE joint_fits SET result = '{}' WHERE id = ?", [stored.id]),
    ).rejects.toThrow(/never overwritten/);
    if (!poppler) return;
    const pdf = await t.app.inject({
      method: 'GET',
      url: `/api/systems/fits/${stored.id}/report.pdf`,
      headers: t.auth('technician'),
    });
    const pages = pdfPages(pdf.rawPayload);
    expect(jointReportProblems(pages, { status: 'approved', figures: 2 })).toEqual([]);
    expect(pages.join('\n')).toMatch(/approved by engineer-2 \(fictional\)/);
  });

  it('self-review where the site allows it: approved, marked in the record, the audit and the PDF', async () => {
    const site = stored.site as string;
    await t.store.sites.setSelfReview(SYSTEM_ACTOR, site, true);
    try {
      const again = await t.store.jointFits.create(
        { id: stored.createdById, name: 'engineer-1' },
        {
          site,
          systemName: stored.systemName,
          settings: stored.settings,
          result: stored.result,
          drawing: stored.drawing,
          notes: null,
          files: [
            {
              role: 'system',
              vessel: '',
              fileName: 's.json',
              bytes: file('wash-transfer.system.json'),
            },
          ],
        },
      );
      const res = await t.app.inject({
        method: 'POST',
        url: `/api/systems/fits/${again.id}/review`,
        headers: t.auth('engineer'),
        payload: { decision: 'approve' },
      });
      expect(res.statusCode, res.body).toBe(200);
      expect(res.json().review.selfReview).toBe(true);
      const entry = (
        await t.store.audit.list({ entityType: 'joint-fit', entityId: String(again.id) })
      ).find((e) => e.action === 'joint-fit.approve')!;
      expect((entry.after as { selfReview?: boolean }).selfReview).toBe(true);
      if (!poppler) return;
      const pdf = await t.app.inject({
        method: 'GET',
        url: `/api/systems/fits/${again.id}/report.pdf`,
        headers: t.auth('auditor'),
      });
      expect(pdfPages(pdf.rawPayload).join('\n')).toMatch(/SELF-REVIEW/);
    } finally {
      await t.store.sites.setSelfReview(SYSTEM_ACTOR, site, false);
    }
  });

  it('a rejected fit’s PDF is marked REJECTED on every page', async () => {
    const third = await t.store.jointFits.create(
      { id: stored.createdById, name: 'engineer-1' },
      {
        site: stored.site,
        systemName: stored.systemName,
        settings: stored.settings,
        result: stored.result,
        drawing: stored.drawing,
        notes: null,
        files: [
          {
            role: 'system',
            vessel: '',
            fileName: 's.json',
            bytes: file('wash-transfer.system.json'),
          },
        ],
      },
    );
    const res = await t.app.inject({
      method: 'POST',
      url: `/api/systems/fits/${third.id}/review`,
      headers: { authorization: `Bearer ${second}` },
      payload: { decision: 'reject', comment: 'pump meter out of calibration' },
    });
    expect(res.statusCode, res.body).toBe(200);
    if (!poppler) return;
    const pdf = await t.app.inject({
      method: 'GET',
      url: `/api/systems/fits/${third.id}/report.pdf`,
      headers: t.auth('auditor'),
    });
    const pages = pdfPages(pdf.rawPayload);
    expect(jointReportProblems(pages, { status: 'rejected', figures: 2 })).toEqual([]);
  });
});
