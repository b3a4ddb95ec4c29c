/**
 * Issue 19's "Done when" for tests that fall due: on the demo data with the clock set to
 * 2026-12-05, the three filter-drain outlets show as overdue with the age of their last test, and
 * FD-2's forecast interval (the 95 % prediction interval for a new test) is wider than it was on
 * the day after its last test. The demo is loaded the service's way; the clock is the app's
 * injected clockMs (and `asOf` for the earlier day).
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { HISTORIES } from '../../server/demo/scenario.js';
import { buildApp } from '../../server/http/app.js';
import { loadDemo } from '../../server/jobs/demo.js';
import type { DueList } from '../../server/jobs/due.js';
import type { FleetView, TrendView } from '../../server/jobs/trend.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { openTestStore } from '../support/store.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const NOW = Date.UTC(2026, 11, 5); // 2026-12-05
const DAY = 86_400_000;
let store: Store;
let app: FastifyInstance;
let auth: { authorization: string };
const outletOf: Record<string, number> = {};

async function get<T>(url: string): Promise<T> {
  const res = await app.inject({ method: 'GET', url, headers: auth });
  expect(res.statusCode, `${url}: ${res.body}`).toBe(200);
  return res.json() as T;
}

beforeAll(async () => {
  store = await openTestStore({ now: () => new Date(NOW).toISOString() });
  await loadDemo(
    store,
    async (req) => analyzeDrainTest(req),
    join(root, 'sample-data/manifest.json'),
  );
  auth = {
    authorization: `Bearer ${(await store.users.createToken(SYSTEM_ACTOR, 'reader', 'engineer')).token}`,
  };
  app = await buildApp({
    store,
    analyze: async (req) => analyzeDrainTest(req),
    clockMs: () => NOW,
  });
  for (const h of HISTORIES) {
    const id = (await store.vessels.findId('Kestrel Fen works (fictional)', h.vessel.name))!;
    outletOf[h.logPrefix] = (await store.vessels.get(id)).outlets[0].id;
  }
}, 120_000);

afterAll(async () => {
  await app.close();
  await store.close();
});

describe('FD-3 trend chart data (issue 17: no straight line through its flagged 7 % step)', () => {
  it('cuts the first epoch at the step: each side its own line; the cleaning starts another epoch', async () => {
    const tr = await get<TrendView>(`/api/outlets/${outletOf.fd3}/trend`);
    expect(tr.epochs.length).toBe(2);
    const first = tr.epochs[0];
    expect(first.step?.flagged).toBe(true);
    expect(first.segments.length).toBe(2);
    const [before, after] = first.segments;
    expect(after.startedBy).toBe('step');
    expect(after.fitIds[0]).toBe(first.step!.fitId);
    // the scenario: drift −1 %/year, a 7 % step down at the tenth test (server/demo/scenario.ts)
    expect(before.fitIds.length).toBe(9);
    expect(before.area).not.toBeNull();
    // the line before the step ends near its own tests, not dragged down by the step
    const lastBefore = before.areaBand[before.areaBand.length - 1].value;
    const lastAfterFirst = after.areaBand[0]?.value ?? Number.NaN;
    const pts = first.series.map((p) => p.effectiveAreaM2);
    expect(Math.abs(lastBefore / pts[8] - 1)).toBeLessThan(0.02);
    // after the step: the tests from the tenth on sit about 7 % lower
    expect(pts[9] / pts[8] - 1).toBeLessThan(-0.04);
    if (after.area) expect(Math.abs(lastAfterFirst / pts[9] - 1)).toBeLessThan(0.02);
  });
});

describe('tests that fall due, demo data, clock at 2026-12-05', () => {
  it('the three filter-drain outlets are overdue, with the age of their last test', async () => {
    const due = await get<DueList>('/api/due?site=kestrel');
    expect(due.sites).toEqual(['Kestrel Fen works (fictional)']);
    for (const prefix of ['fd1', 'fd2', 'fd3']) {
      const item = due.items.find((i) => i.outletId === outletOf[prefix]);
      expect(item, prefix).toBeDefined();
      expect(item!.overdue).toBe(true);
      expect(item!.intervalDays).toBe(180); // the site default
      const age = (NOW - Date.parse(item!.latestTestAt!)) / DAY;
      expect(item!.latestTestAgeDays).toBeCloseTo(age, 6);
      expect(age).toBeGreaterThan(180);
      expect(item!.reason).toMatch(
        /^overdue since \d{4}-\d\d-\d\d, by \d+ days.*: the latest test \(\d{4}-\d\d-\d\d\) is \d+ days \(\d+\.\d months\) old/,
      );
    }
    // soonest first: next-due dates never go backwards down the list
    const dues = due.items.map((i) => i.nextDueMs ?? -Infinity);
    expect(dues).toEqual([...dues].sort((a, b) => a - b));
    // the fleet flags them too
    const fleet = await get<FleetView>('/api/fleet?limit=500');
    for (const prefix of ['fd1', 'fd2', 'fd3']) {
      const f = fleet.items.find((i) => i.outletId === outletOf[prefix])!;
      expect(f.schedule?.overdue, prefix).toBe(true);
    }
  });

  it("FD-2's forecast says how old its latest test is, and its interval is wider than the day after that test", async () => {
    const id = outletOf.fd2;
    const now = await get<TrendView>(`/api/outlets/${id}/trend`);
    const lastAt = now.schedule.latestTestAt!;
    const dayAfter = new Date(Date.parse(lastAt) + DAY).toISOString();
    const then = await get<TrendView>(
      `/api/outlets/${id}/trend?asOf=${encodeURIComponent(dayAfter)}`,
    );
    const cur = now.epochs.find((e) => e.current)!;
    const curThen = then.epochs.find((e) => e.current)!;
    expect(now.schedule.overdue).toBe(true);
    expect(then.schedule.overdue).toBe(false);
    expect(cur.forecast!.reason).toMatch(
      /the latest test is \d+ days \(\d+\.\d months\) old \(overdue since/,
    );
    expect(cur.forecast!.reason).toMatch(/a test today is expected to read [\d.]+ ± [\d.]+ mm²/);
    expect(curThen.forecast!.reason).not.toMatch(/overdue/);
    const wNow = cur.newTestNow!.halfWidth95,
      wThen = curThen.newTestNow!.halfWidth95;
    expect(wNow).toBeGreaterThan(wThen);
    console.log(
      `FD-2 95 % prediction half-width: ${(wThen * 1e6).toFixed(3)} mm² on ${dayAfter.slice(0, 10)}, ${(wNow * 1e6).toFixed(3)} mm² on 2026-12-05 (latest test ${lastAt.slice(0, 10)}, ${now.schedule.latestTestAgeDays!.toFixed(0)} days old)`,
    );
  });
});
