/**
 * Durations for people: seconds and minutes for a drain, hours and days for a soak, and months or
 * years beyond 90 days ("in about 9.3 years", not "in about 3386 days"; issue 17 §3).
 */

/** Days in the mean Gregorian year (400-year cycle: 146 097 days / 400; common practice). */
export const DAYS_PER_YEAR = 365.2425;
export const DAYS_PER_MONTH = DAYS_PER_YEAR / 12;
/** Longer than this many days is said in months or years. */
export const DAYS_BEFORE_MONTHS = 90;
/** From this many months on, years. */
export const MONTHS_BEFORE_YEARS = 24;

const plural = (n: string, one: string, many: string) => `${n} ${n === '1' ? one : many}`;

/** "45 s", "12 min", "5.5 h", "12 days", "9 months", "9.3 years" (magnitude only; sign kept). */
export function durationText(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return '—';
  const sign = seconds < 0 ? '−' : '';
  const s = Math.abs(seconds);
  const days = s / 86400;
  let text: string;
  if (s < 120) text = `${s.toFixed(0)} s`;
  else if (s < 7200) text = `${(s / 60).toFixed(0)} min`;
  else if (s < 172800) text = `${(s / 3600).toFixed(1)} h`;
  else if (days <= DAYS_BEFORE_MONTHS) text = plural(days.toFixed(0), 'day', 'days');
  else if (days / DAYS_PER_MONTH < MONTHS_BEFORE_YEARS)
    text = plural((days / DAYS_PER_MONTH).toFixed(0), 'month', 'months');
  else text = plural((days / DAYS_PER_YEAR).toFixed(1), 'year', 'years');
  return sign + text;
}

/** A whole-day count in words: "1 day", "40 days", "9 months", "2.1 years". */
export function daysText(days: number | null | undefined): string {
  if (days === null || days === undefined || !Number.isFinite(days)) return '—';
  const a = Math.abs(days);
  if (a >= 1 && a <= DAYS_BEFORE_MONTHS)
    return (days < 0 ? '−' : '') + plural(a.toFixed(0), 'day', 'days');
  return durationText(days * 86400);
}
