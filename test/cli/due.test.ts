/**
 * `efflux site clock`, `efflux outlet interval` and `efflux due` against a data folder holding one
 * approved demo test of FB-1 (tested 2026-03-10). The clock is --as-of.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { reportFixture } from '../render/report-fixture.js';
import { effluxWithData } from './run-cli.js';

let dataDir: string;
let outletId: number;
let site: string;

beforeAll(async () => {
  const fx = await reportFixture();
  outletId = fx.outletId;
  site = (await fx.store.vessels.get(fx.vesselId)).site;
  await fx.store.close();
  dataDir = fx.dataDir;
}, 60_000);

describe('efflux site clock / outlet interval / due', () => {
  it('shows and sets a site time zone (canonical IANA spelling) and interval; refuses bad ones with exit 2', () => {
    const show = effluxWithData(dataDir, ['site', 'clock', site]);
    expect(show.code, show.stderr).toBe(0);
    expect(show.stdout).toContain('time zone UTC, a drain test every 180 days');
    const set = effluxWithData(dataDir, [
      'site',
      'clock',
      site,
      '--time-zone',
      'europe/lisbon',
      '--interval',
      '120',
    ]);
    expect(set.code, set.stderr).toBe(0);
    expect(set.stdout).toContain('time zone Europe/Lisbon, a drain test every 120 days');
    const badZone = effluxWithData(dataDir, ['site', 'clock', site, '--time-zone', 'Mars/Olympus']);
    expect(badZone.code).toBe(2);
    expect(badZone.stderr).toContain('unknown time zone "Mars/Olympus"');
    const badDays = effluxWithData(dataDir, ['site', 'clock', site, '--interval', '1.5']);
    expect(badDays.code).toBe(2);
    expect(badDays.stderr).toMatch(/whole number of days/);
    const all = effluxWithData(dataDir, ['site', 'clock']);
    expect(all.code, all.stderr).toBe(0);
    expect(all.stdout).toContain(`site "${site}": time zone Europe/Lisbon`);
    const noSite = effluxWithData(dataDir, ['site', 'clock', 'No such site']);
    expect(noSite.code).toBe(2);
  }, 240_000);

  it('lists the overdue outlet with the age of its last test; an outlet interval overrides the site', () => {
    // site interval 120 days (set above): 2026-03-10 + 120 d = 2026-07-08; on 2026-12-05 overdue
    const late = effluxWithData(dataDir, [
      'due',
      '--site',
      site.slice(0, 6).toUpperCase(),
      '--as-of',
      '2026-12-05',
    ]);
    expect(late.code, late.stderr).toBe(0);
    const row = late.stdout
      .split('\n')
      .find((l) => l.includes(` ${outletId} `) || l.trimStart().startsWith(String(outletId)));
    expect(row, late.stdout).toBeDefined();
    // 2026-03-10T08:15Z to 2026-12-05T00:00Z is 269.66 days
    expect(row).toMatch(/2026-03-10\s+270\s+2026-07-08\s+120 d\s+OVERDUE by 150 days/);
    const json = JSON.parse(
      effluxWithData(dataDir, ['due', '--as-of', '2026-12-05', '--json']).stdout,
    );
    const item = json.items.find((i: { outletId: number }) => i.outletId === outletId);
    expect(item.latestTestAgeDays).toBeCloseTo(269.65625, 6);

    const own = effluxWithData(dataDir, ['outlet', 'interval', String(outletId), '365']);
    expect(own.code, own.stderr).toBe(0);
    const notYet = effluxWithData(dataDir, ['due', '--as-of', '2026-12-05', '--json']);
    expect(
      JSON.parse(notYet.stdout).items.some((i: { outletId: number }) => i.outletId === outletId),
    ).toBe(false);
    const soon = JSON.parse(
      effluxWithData(dataDir, ['due', '--as-of', '2026-12-05', '--within', '120', '--json']).stdout,
    );
    const s = soon.items.find((i: { outletId: number }) => i.outletId === outletId);
    expect(s.intervalSource).toBe('outlet');
    expect(s.nextDueAt.slice(0, 10)).toBe('2027-03-10');
    expect(effluxWithData(dataDir, ['outlet', 'interval', String(outletId), 'site']).code).toBe(0);
    expect(effluxWithData(dataDir, ['outlet', 'interval', '99999', '30']).code).toBe(2);
    expect(effluxWithData(dataDir, ['due', '--bogus']).code).toBe(2);
  }, 240_000);
});
