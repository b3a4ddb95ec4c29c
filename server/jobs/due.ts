/**
 * Tests that fall due (shell): reads each outlet's intervals and latest test from the
 * store (server/store/schedule.ts), asks server/core/trend/due.ts when each is next due, and
 * shapes the answer for the trend view, the fleet, `GET /api/due` and `efflux due`.
 */
import {
  ageInWords,
  testSchedule,
  type NewTestPrediction,
  type TestSchedule,
} from '../core/trend/index.js';
import type { Store } from '../store/index.js';
import type { OutletScheduleRow } from '../store/schedule.js';
import type { NewTestView, ScheduleView } from './trend-views.js';

const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString());

function reasonOf(s: TestSchedule): string {
  const every = `every ${s.intervalDays} days (${s.intervalSource === 'outlet' ? "the outlet's own interval" : "the site's interval"})`;
  if (s.neverTested) return `never tested: due now; then ${every}`;
  const age = `the latest test (${day(s.latestTestMs!)}) is ${ageInWords(s.latestTestAgeDays!)} old`;
  if (s.overdue)
    return `overdue since ${day(s.nextDueMs!)}, by ${ageInWords(-s.daysUntilDue!)}: ${age}; due ${every}`;
  return `next test due ${day(s.nextDueMs!)}, in ${ageInWords(s.daysUntilDue!)}: ${age}; due ${every}`;
}

export function scheduleOf(row: OutletScheduleRow, nowMs: number): ScheduleView {
  const latest = row.latestTestAt === null ? null : Date.parse(row.latestTestAt);
  const s = testSchedule(
    latest !== null && Number.isFinite(latest) ? latest : null,
    row.outletIntervalDays ?? row.siteIntervalDays,
    row.outletIntervalDays === null ? 'site' : 'outlet',
    nowMs,
  );
  return {
    intervalDays: s.intervalDays,
    intervalSource: s.intervalSource,
    latestTestAt: iso(s.latestTestMs),
    latestTestAgeDays: s.latestTestAgeDays,
    nextDueAt: iso(s.nextDueMs),
    nextDueMs: s.nextDueMs,
    daysUntilDue: s.daysUntilDue,
    overdue: s.overdue,
    neverTested: s.neverTested,
    reason: reasonOf(s),
  };
}

export function newTestView(p: NewTestPrediction | null): NewTestView | null {
  return p && { at: new Date(p.atMs).toISOString(), ...p };
}

/** Value ± half-width in mm², the half-width to two significant digits and the value to match (JCGM 100 §7.2.6). */
export function mm2WithInterval(valueM2: number, halfWidthM2: number): string {
  const v = valueM2 * 1e6,
    hw = halfWidthM2 * 1e6;
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(Math.abs(hw))));
  return `${v.toFixed(decimals)} ± ${hw.toPrecision(2).replace(/e.*$/, '')} mm²`;
}

/** The sentence an overdue outlet's forecast gains: how old the latest test is, what a test now would read. */
export function overdueSentence(s: ScheduleView, now: NewTestPrediction | null): string | null {
  if (!s.overdue || s.neverTested) return null;
  const age = `the latest test is ${ageInWords(s.latestTestAgeDays!)} old (overdue since ${s.nextDueAt!.slice(0, 10)})`;
  if (!now) return age;
  return `${age}: a test today is expected to read ${mm2WithInterval(now.value, now.halfWidth95)} (95 % prediction interval for a new test, wider the longer since the last test)`;
}

export interface DueItem extends ScheduleView {
  outletId: number;
  outletKey: string;
  vesselId: number;
  vesselName: string;
  site: string;
}

export interface DueList {
  asOf: string;
  nowMs: number;
  /** The sites the filter matched (all when there was none). */
  sites: string[];
  /** Due within `withinDays` or overdue, soonest first (never tested first of all). */
  items: DueItem[];
  withinDays: number;
}

export interface DueQuery {
  /** Case-insensitive part of a site name. */
  site?: string;
  /** A person limited to these sites; null = every site. */
  sites?: readonly string[] | null;
  /** Also list outlets due within this many days (default 30). */
  withinDays?: number;
}

export async function dueList(store: Store, q: DueQuery, nowMs: number): Promise<DueList> {
  const within = q.withinDays ?? 30;
  let rows = (await store.schedule.outlets()).filter((r) => !r.retired);
  if (q.sites) rows = rows.filter((r) => q.sites!.includes(r.site));
  if (q.site !== undefined) {
    const part = q.site.toLowerCase();
    rows = rows.filter((r) => r.site.toLowerCase().includes(part));
  }
  const items = rows
    .map((r) => ({
      outletId: r.outletId,
      outletKey: r.outletKey,
      vesselId: r.vesselId,
      vesselName: r.vesselName,
      site: r.site,
      ...scheduleOf(r, nowMs),
    }))
    .filter((i) => i.neverTested || i.daysUntilDue! <= within)
    .sort(
      (a, b) => (a.nextDueMs ?? -Infinity) - (b.nextDueMs ?? -Infinity) || a.outletId - b.outletId,
    );
  return {
    asOf: new Date(nowMs).toISOString(),
    nowMs,
    sites: [...new Set(rows.map((r) => r.site))].sort(),
    items,
    withinDays: within,
  };
}

/** Every outlet's schedule by id (for the fleet). */
export async function schedulesById(
  store: Store,
  nowMs: number,
): Promise<Map<number, ScheduleView>> {
  const m = new Map<number, ScheduleView>();
  for (const r of await store.schedule.outlets()) m.set(r.outletId, scheduleOf(r, nowMs));
  return m;
}
