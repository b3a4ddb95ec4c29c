/**
 * Tick marks a reader can count: dates on calendar boundaries (days, Mondays, the first of a month
 * every 1, 2, 3 or 6 months, the first of a year), labelled in ISO 8601 (2025-03, 2025-03-09). Pure.
 */
import { dayText } from './report-format.js';

const DAY_MS = 86_400_000;

export interface Tick {
  value: number;
  label: string;
}

function monthTicks(lo: number, hi: number, months: number): Tick[] {
  const d = new Date(lo);
  const y = d.getUTCFullYear();
  let m = d.getUTCMonth();
  // the first month boundary at or after lo that is a multiple of `months` within the year
  m = Math.ceil(m / months) * months;
  const out: Tick[] = [];
  for (;;) {
    const t = Date.UTC(y + Math.floor(m / 12), m % 12, 1);
    if (t < lo) {
      m += months;
      continue;
    }
    if (t > hi) break;
    const iso = dayText(t);
    out.push({ value: t, label: months % 12 === 0 ? iso.slice(0, 4) : iso.slice(0, 7) });
    m += months;
  }
  return out;
}

function dayTicks(lo: number, hi: number, days: number): Tick[] {
  let t = Math.ceil(lo / DAY_MS) * DAY_MS;
  // weeks start on Monday (ISO 8601); 1970-01-01 was a Thursday
  if (days === 7) while (new Date(t).getUTCDay() !== 1) t += DAY_MS;
  const out: Tick[] = [];
  for (; t <= hi; t += days * DAY_MS) out.push({ value: t, label: dayText(t) });
  return out;
}

/** Date ticks for a time axis in ms, at most `maxTicks` of them, on even calendar steps. */
export function dateTicks(lo: number, hi: number, maxTicks = 7): Tick[] {
  if (!(hi > lo)) return [{ value: lo, label: dayText(lo) }];
  const candidates: (() => Tick[])[] = [
    () => dayTicks(lo, hi, 1),
    () => dayTicks(lo, hi, 7),
    () => dayTicks(lo, hi, 14),
    ...[1, 2, 3, 6, 12, 24, 60].map((m) => () => monthTicks(lo, hi, m)),
  ];
  for (const make of candidates) {
    const ticks = make();
    if (ticks.length <= maxTicks) return ticks;
  }
  return candidates[candidates.length - 1]();
}
