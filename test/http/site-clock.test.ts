/**
 * Sites and their clocks through the API: a site's zone and interval set and checked, a log with
 * local times and no offset read in the site's zone unless the upload states another (and the
 * reader says which), and both daylight-saving edges in a real zone (Europe/Lisbon, 2026: clocks
 * forward 29 March 01:00 → 02:00, back 25 October 02:00 → 01:00; from the IANA tz database,
 * checked here through Intl itself). The log is the demo's FB-1 test (1 s samples, 38 min),
 * its times rewritten.
 */
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { multipart, testApp, type TestApp } from './helpers.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const SITE = 'Kestrel Fen works (fictional)';
const SRC = readFileSync(join(root, 'sample-data/fb1-2026-03-10-preamble.csv'), 'utf8');
const FIRST = Date.parse('2026-03-10T08:15:00Z');
const LISBON = new Intl.DateTimeFormat('sv-SE', {
  timeZone: 'Europe/Lisbon',
  year: 'numeric',
  month: '2-digit',
  day: '2-digit',
  hour: '2-digit',
  minute: '2-digit',
  second: '2-digit',
  hourCycle: 'h23',
});

/** The FB-1 log with each time replaced by wall(ms of the same sample, moved to start at startMs). */
function rewritten(startMs: number, wall: (ms: number) => string): Buffer {
  const out = SRC.split('\n').map((line) => {
    const m = /^(\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ),/.exec(line);
    if (!m) return line;
    return `${wall(startMs + Date.parse(m[1]) - FIRST)},${line.slice(m[0].length)}`;
  });
  return Buffer.from(out.join('\n'));
}
const naive = (ms: number) => new Date(ms).toISOString().slice(0, 19).replace('T', ' ');
const lisbonWall = (ms: number) => LISBON.format(ms).replace(',', '');

let t: TestApp;
let vesselId: number;

async function upload(bytes: Buffer, fields: Record<string, string> = {}) {
  const m = multipart([{ field: 'log', name: 'fb1-local.csv', bytes }], fields);
  return t.app.inject({
    method: 'POST',
    url: `/api/vessels/${vesselId}/tests`,
    headers: { ...t.auth('technician'), ...m.headers },
    payload: m.payload,
  });
}

beforeAll(async () => {
  t = await testApp({ analyze: async (req) => analyzeDrainTest(req) });
  const spec = JSON.parse(
    readFileSync(join(root, 'sample-data/backwash-tank-fb1.vessel.json'), 'utf8'),
  );
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('engineer'),
    payload: spec,
  });
  expect(v.statusCode, v.body).toBe(201);
  vesselId = v.json().id;
}, 60_000);

describe("a site's clock", () => {
  it('starts at UTC and 180 days; an engineer sets a checked zone and interval, bad ones are 422', async () => {
    const url = `/api/sites/${encodeURIComponent(SITE)}/clock`;
    const before = await t.app.inject({ method: 'GET', url, headers: t.auth('auditor') });
    expect(before.json()).toMatchObject({ timeZone: 'UTC', testIntervalDays: 180 });
    const bad = await t.app.inject({
      method: 'PUT',
      url,
      headers: t.auth('engineer'),
      payload: { timeZone: 'Europe/Atlantis' },
    });
    expect(bad.statusCode).toBe(422);
    expect(bad.json().detail ?? bad.body).toContain('unknown time zone "Europe/Atlantis"');
    const zero = await t.app.inject({
      method: 'PUT',
      url,
      headers: t.auth('engineer'),
      payload: { testIntervalDays: 0 },
    });
    expect(zero.statusCode).toBeGreaterThanOrEqual(400);
    expect(zero.statusCode).toBeLessThan(500);
    const ok = await t.app.inject({
      method: 'PUT',
      url,
      headers: t.auth('engineer'),
      payload: { timeZone: 'europe/lisbon', testIntervalDays: 90 },
    });
    expect(ok.statusCode, ok.body).toBe(200);
    expect(ok.json()).toMatchObject({ timeZone: 'Europe/Lisbon', testIntervalDays: 90 });
  });

  it("reads local times in the site's zone and says so; a stated zone wins", async () => {
    // 2026-03-10 is winter time in Lisbon (UTC+0): move the test to July (UTC+1) so the zone shows
    const july = rewritten(Date.parse('2026-07-10T08:15:00Z'), naive); // wall 08:15 local, written bare
    const site = await upload(july);
    expect(site.statusCode, site.body).toBe(201);
    const r = site.json().fit.result.read;
    expect(r.t0).toBe('2026-07-10T07:15:00.000Z'); // 08:15 WEST = 07:15 UTC
    expect(JSON.stringify(r.notes)).toContain("read in Europe/Lisbon (the site's zone)");
    expect(site.json().test.settings).toMatchObject({ tz: 'Europe/Lisbon', tzSource: 'site' });

    const stated = await upload(rewritten(Date.parse('2026-07-11T08:15:00Z'), naive), {
      tz: 'Asia/Tokyo',
    });
    expect(stated.statusCode, stated.body).toBe(201);
    const s = stated.json().fit.result.read;
    expect(s.t0).toBe('2026-07-10T23:15:00.000Z'); // 08:15 JST = 23:15 UTC the day before
    expect(JSON.stringify(s.notes)).toContain('read in Asia/Tokyo (as stated)');
  });

  it('spring forward: a local time in the skipped hour is a clear error naming its line', async () => {
    // written naively from 00:40 on 29 March: the row at 01:00:00 (line 8 + 1200) does not exist
    const res = await upload(rewritten(Date.parse('2026-03-29T00:40:00Z'), naive));
    expect(res.statusCode).toBe(422);
    const body = res.body;
    expect(body).toContain('2026-03-29 01:00:00');
    expect(body).toContain('does not exist in Europe/Lisbon');
    expect(res.json().line ?? body).toSatisfy(
      (x: unknown) => x === 1208 || String(x).includes('1208'),
    );
  });

  it('fall back: the repeated hour is resolved by row order, with a warning, and the instants stay 1 s apart', async () => {
    // the logger follows Lisbon's clock across 25 October: 01:40 … 01:59:59, 01:00:00 … again
    const start = Date.parse('2026-10-25T00:40:00Z');
    const bytes = rewritten(start, lisbonWall);
    expect(bytes.toString()).toContain('2026-10-25 01:59:59');
    const res = await upload(bytes);
    expect(res.statusCode, res.body).toBe(201);
    const fit = res.json().fit;
    expect(fit.result.read.t0).toBe(new Date(start).toISOString());
    expect(JSON.stringify(fit.result.warnings)).toMatch(
      /repeated when clocks went back in Europe\/Lisbon: resolved by row order/,
    );
    // the same drain read from UTC times gives the same Cd·a: the instants are the same
    const utc = await upload(
      rewritten(start + 3_600_000 * 24 * 7, (ms) => new Date(ms).toISOString()),
    );
    expect(utc.statusCode, utc.body).toBe(201);
    expect(
      fit.result.effectiveAreaM2.value / utc.json().fit.result.effectiveAreaM2.value - 1,
    ).toBeCloseTo(0, 9);
  });

  it('due list: a test awaiting review counts as done; one whose fit was rejected does not', async () => {
    const list = await t.app.inject({
      method: 'GET',
      url: `/api/vessels/${vesselId}/tests?limit=100`,
      headers: t.auth('engineer'),
    });
    const tests = (list.json().items as { id: number; testedAt: string; outletId: number }[])
      .filter((x) => x.testedAt)
      .sort((a, b) => Date.parse(a.testedAt) - Date.parse(b.testedAt));
    expect(tests.length).toBeGreaterThanOrEqual(3);
    const due = async () =>
      (
        await t.app.inject({
          method: 'GET',
          url: '/api/due?asOf=2028-01-01',
          headers: t.auth('auditor'),
        })
      )
        .json()
        .items.find((i: { outletId: number }) => i.outletId === tests[0].outletId);
    const newest = tests[tests.length - 1];
    expect(Date.parse((await due()).latestTestAt)).toBe(Date.parse(newest.testedAt));
    const fits = await t.app.inject({
      method: 'GET',
      url: `/api/tests/${newest.id}/fits`,
      headers: t.auth('engineer'),
    });
    const fitId = (fits.json().items ?? fits.json())[0].id;
    const rej = await t.app.inject({
      method: 'POST',
      url: `/api/fits/${fitId}/review`,
      headers: t.auth('engineer'),
      payload: { decision: 'reject', comment: 'logger clock doubtful (test of the due rule)' },
    });
    expect(rej.statusCode, rej.body).toBe(200);
    const after = await due();
    expect(Date.parse(after.latestTestAt)).toBe(Date.parse(tests[tests.length - 2].testedAt));
    expect(after.intervalDays).toBe(90); // the site's, set above
  });
});
