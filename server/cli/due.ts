/**
 * Tests that fall due, at the machine (the same store calls as the API, audited as the system):
 *   efflux due [--site PART] [--within DAYS] [--as-of DATE] [--json]
 *   efflux site clock SITE [--time-zone ZONE] [--interval DAYS]
 *   efflux outlet interval OUTLET_ID DAYS|site
 */
import { InputError } from '../core/errors.js';
import { checkTimeZone } from '../core/ingest/zone.js';
import { checkIntervalDays, DEFAULT_TEST_INTERVAL_DAYS } from '../core/trend/index.js';
import { dueList, scheduleOf, type DueList } from '../jobs/due.js';
import { NotFoundError, openStore, SYSTEM_ACTOR } from '../store/index.js';
import type { SiteClock } from '../store/schedule.js';
import { guarded } from './io.js';
import { outletByName } from './names.js';
import { storeLocation } from './serve-config.js';

const DUE_USAGE = `usage: efflux due [--site PART] [--within DAYS] [--as-of DATE] [--json]
  Outlets overdue for a drain test, or due within DAYS (default 30), soonest first, with the age
  of each latest test (approved or awaiting review). --site matches part of a site name, any case.
  Each outlet is tested every N days: its own interval (efflux outlet interval) or its site's
  (efflux site clock SITE --interval N; ${DEFAULT_TEST_INTERVAL_DAYS} days unless set, a common practice, not a standard).
  Drain tests involve work at height, confined spaces and discharges: follow site procedures.
`;

const SITE_USAGE = `usage: efflux site clock [SITE [--time-zone ZONE] [--interval DAYS]]
  Without options: shows the site's time zone and default test interval (every site's without SITE).
  --time-zone  IANA name (e.g. Europe/Lisbon): local log times without an offset are read in it
  --interval   default days between drain tests of the site's outlets (1 to 3660)
`;

const OUTLET_USAGE = `usage: efflux outlet interval OUTLET DAYS|site
  The outlet's own days between drain tests, or "site" to follow its site's interval.
  OUTLET is its id or its tag (as for efflux trend).
`;

function option(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(`--${name}`);
  if (i >= 0) return argv[i + 1];
  return argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3);
}

function wholeDays(text: string | undefined, field: string): number {
  const n = Number(text);
  if (text === undefined || text.trim() === '' || !Number.isFinite(n))
    throw new InputError(`give a whole number of days, not "${text ?? ''}"`, { field });
  return checkIntervalDays(n, field);
}

/** Store lookups that find nothing are the operator's mistake: exit 2 with the message. */
async function asInput<T>(f: () => Promise<T>, field: string): Promise<T> {
  try {
    return await f();
  } catch (e) {
    if (e instanceof NotFoundError) throw new InputError(e.message, { field });
    throw e;
  }
}

const day = (iso: string | null) => (iso ? iso.slice(0, 10) : '—');

export function dueText(d: DueList): string {
  const out = [
    `due as of ${d.asOf.slice(0, 10)} (overdue, or due within ${d.withinDays} days), site${d.sites.length === 1 ? '' : 's'}: ${d.sites.join(', ') || 'none matched'}`,
  ];
  if (!d.items.length) {
    out.push('  nothing due');
    return out.join('\n') + '\n';
  }
  out.push(
    '  outlet  vessel / outlet                      latest test  age (days)  next due     every   state',
  );
  for (const i of d.items) {
    const name = `${i.vesselName} / ${i.outletKey}`;
    const shown = name.length > 35 ? `${name.slice(0, 34)}…` : name;
    const state = i.neverTested
      ? 'never tested: due now'
      : i.overdue
        ? `OVERDUE by ${Math.round(-i.daysUntilDue!)} days`
        : `due in ${Math.round(i.daysUntilDue!)} days`;
    out.push(
      `  ${String(i.outletId).padStart(6)}  ${shown.padEnd(35)}  ${day(i.latestTestAt).padEnd(11)}  ${(i.latestTestAgeDays === null ? '—' : String(Math.round(i.latestTestAgeDays))).padStart(10)}  ${day(i.nextDueAt).padEnd(11)}  ${`${i.intervalDays} d`.padStart(6)}  ${state}`,
    );
  }
  return out.join('\n') + '\n';
}

function asOfMs(argv: string[]): number {
  const a = option(argv, 'as-of');
  if (a === undefined) return Date.now();
  const ms = Date.parse(a);
  if (!Number.isFinite(ms)) throw new InputError(`not a date: "${a}"`, { field: 'as-of' });
  return ms;
}

export async function runDue(argv: string[]): Promise<number> {
  if (argv.includes('--help')) {
    process.stdout.write(DUE_USAGE);
    return 0;
  }
  return guarded(async () => {
    const known = new Set(['--site', '--within', '--as-of', '--json']);
    for (const a of argv)
      if (a.startsWith('--') && !known.has(a.split('=')[0]))
        throw new InputError(`unknown option ${a}`, { field: a.slice(2) });
    const within = option(argv, 'within');
    const nowMs = asOfMs(argv);
    const store = await openStore(storeLocation());
    try {
      const d = await dueList(
        store,
        {
          site: option(argv, 'site'),
          withinDays: within === undefined ? undefined : wholeDays(within, 'within'),
        },
        nowMs,
      );
      process.stdout.write(
        argv.includes('--json') ? JSON.stringify(d, null, 2) + '\n' : dueText(d),
      );
      return 0;
    } finally {
      await store.close();
    }
  });
}

const clockLine = (s: SiteClock) =>
  `site "${s.name}": time zone ${s.timeZone}, a drain test every ${s.testIntervalDays} days unless an outlet sets its own\n`;

/** `efflux site clock …`; the other `efflux site` subcommands stay in people.ts. */
export async function runSite(argv: string[]): Promise<number> {
  if (argv[0] !== 'clock') return (await import('./people.js')).runSite(argv);
  const [, site, ...rest] = argv;
  if (site === '--help') {
    process.stdout.write(SITE_USAGE);
    return 0;
  }
  if (site?.startsWith('--')) {
    process.stderr.write(SITE_USAGE);
    return 2;
  }
  if (site === undefined)
    return guarded(async () => {
      const store = await openStore(storeLocation());
      try {
        for (const s of await store.schedule.sites()) process.stdout.write(clockLine(s));
        return 0;
      } finally {
        await store.close();
      }
    });
  return guarded(async () => {
    const zone = option(rest, 'time-zone');
    const interval = option(rest, 'interval');
    const change = {
      ...(zone !== undefined ? { timeZone: checkTimeZone(zone, 'time-zone') } : {}),
      ...(interval !== undefined ? { testIntervalDays: wholeDays(interval, 'interval') } : {}),
    };
    const store = await openStore(storeLocation());
    try {
      const s = await asInput(
        () =>
          Object.keys(change).length
            ? store.schedule.setSite(SYSTEM_ACTOR, site, change)
            : store.schedule.site(site),
        'site',
      );
      process.stdout.write(clockLine(s));
      return 0;
    } finally {
      await store.close();
    }
  });
}

/** `efflux outlet interval OUTLET_ID DAYS|site`. */
export async function runOutletInterval(argv: string[]): Promise<number> {
  const [, idText, daysText] = argv;
  if (!idText || !daysText) {
    process.stderr.write(OUTLET_USAGE);
    return 2;
  }
  return guarded(async () => {
    const days = daysText === 'site' ? null : wholeDays(daysText, 'days');
    const store = await openStore(storeLocation());
    try {
      const id = (await outletByName(store, idText)).outletId;
      await asInput(() => store.schedule.outletInterval(id), 'outlet');
      await store.schedule.setOutletInterval(SYSTEM_ACTOR, id, days);
      const [row] = await store.schedule.outlets(id);
      const s = scheduleOf(row, Date.now());
      process.stdout.write(
        `outlet ${id} (${row.vesselName} / ${row.outletKey}): ${days === null ? `follows its site's interval, ${row.siteIntervalDays} days` : `tested every ${days} days`}; ${s.reason}\n`,
      );
      return 0;
    } finally {
      await store.close();
    }
  });
}

/** `efflux outlet …`: the interval here, the threshold (and help) in vessel.ts. */
export async function runOutlet(argv: string[]): Promise<number> {
  if (argv[0] === 'interval') return runOutletInterval(argv);
  return (await import('./vessel.js')).runOutlet(argv);
}
