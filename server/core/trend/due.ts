/**
 * Tests that fall due: each outlet is drain-tested every so many days (its own interval, or its
 * site's). From the latest test and the interval: the next test's date, whether it is
 * overdue, and how old the latest test is. When a trend line exists, what a test made now would
 * read, with the 95 % prediction interval for a NEW test (not the band of the mean): it widens
 * the longer the outlet goes untested.
 */
import { InputError } from '../errors.js';
import { lineAt, newTestUAt } from './line.js';
import { DAY_MS, yearsSince, type TrendLine } from './trendline.js';

/** 180 days: a common practice for routine drain and outlet checks, not a standard (each site sets its own). */
export const DEFAULT_TEST_INTERVAL_DAYS = 180;
export const MAX_TEST_INTERVAL_DAYS = 3660;

export type IntervalSource = 'outlet' | 'site';

export interface TestSchedule {
  intervalDays: number;
  intervalSource: IntervalSource;
  latestTestMs: number | null;
  /** Whole and fractional days from the latest test to now; null when never tested. */
  latestTestAgeDays: number | null;
  /** latest test + interval; null when never tested (due at once). */
  nextDueMs: number | null;
  /** Days from now to the next test (negative: overdue by that many); null when never tested. */
  daysUntilDue: number | null;
  /** True when the next test's date has passed, or the outlet was never tested. */
  overdue: boolean;
  neverTested: boolean;
}

export function checkIntervalDays(days: unknown, field = 'testIntervalDays'): number {
  if (
    typeof days !== 'number' ||
    !Number.isInteger(days) ||
    days < 1 ||
    days > MAX_TEST_INTERVAL_DAYS
  )
    throw new InputError(
      `test interval must be a whole number of days from 1 to ${MAX_TEST_INTERVAL_DAYS}, got ${String(days)}`,
      { field },
    );
  return days;
}

export function testSchedule(
  latestTestMs: number | null,
  intervalDays: number,
  intervalSource: IntervalSource,
  nowMs: number,
): TestSchedule {
  checkIntervalDays(intervalDays);
  if (!Number.isFinite(nowMs)) throw new InputError('now is not a time', { field: 'nowMs' });
  if (latestTestMs === null || !Number.isFinite(latestTestMs))
    return {
      intervalDays,
      intervalSource,
      latestTestMs: null,
      latestTestAgeDays: null,
      nextDueMs: null,
      daysUntilDue: null,
      overdue: true,
      neverTested: true,
    };
  const nextDueMs = latestTestMs + intervalDays * DAY_MS;
  const daysUntilDue = (nextDueMs - nowMs) / DAY_MS;
  return {
    intervalDays,
    intervalSource,
    latestTestMs,
    latestTestAgeDays: (nowMs - latestTestMs) / DAY_MS,
    nextDueMs,
    daysUntilDue,
    overdue: daysUntilDue < 0,
    neverTested: false,
  };
}

/** What a new test at atMs is expected to read about the trend line, with its 95 % prediction interval. */
export interface NewTestPrediction {
  atMs: number;
  value: number;
  /** Standard uncertainty of a new test's value there (line and single-test scatter). */
  u: number;
  lower: number;
  upper: number;
  /** t_{0.975,dof}·u. */
  halfWidth95: number;
}

export function predictNewTest(line: TrendLine, atMs: number): NewTestPrediction {
  if (!Number.isFinite(atMs)) throw new InputError('time is not a time', { field: 'atMs' });
  const t = yearsSince(line.originMs, atMs);
  const value = lineAt(line.fit, t);
  const u = newTestUAt(line.fit, t);
  const halfWidth95 = line.fit.tQuantile95 * u;
  return { atMs, value, u, lower: value - halfWidth95, upper: value + halfWidth95, halfWidth95 };
}

/** "272 days" under 90 days' worth of days, else months or years (readers count long spans so). */
export function ageInWords(days: number): string {
  const d = Math.round(days);
  if (Math.abs(d) < 90) return `${d} day${Math.abs(d) === 1 ? '' : 's'}`;
  const months = days / 30.4375;
  if (Math.abs(months) < 24) return `${d} days (${months.toFixed(1)} months)`;
  return `${d} days (${(days / 365.25).toFixed(1)} years)`;
}
