/**
 * The date a person states for a test (`testedAt`): ISO 8601 only, a real calendar date, not in
 * the future beyond a small clock skew and not before loggers of this kind kept dates. Pure: the
 * caller passes "now".
 */
import { InputError } from '../errors.js';

/** Clocks of a client and the service may differ a little (common practice: minutes, not hours). */
export const TEST_DATE_SKEW_MS = 5 * 60_000;
/** Earliest date accepted: no logger of the kind efflux reads could have recorded before it (issue 12's bound). */
export const EARLIEST_TEST_DATE = '1990-01-01T00:00:00Z';

// date, or date and time with seconds and fraction optional and a UTC offset required (Z or ±hh:mm)
const ISO =
  /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2}))?$/;

/** The stated date in UTC ISO 8601 (a date alone is midnight UTC); InputError on field testedAt otherwise. */
export function checkStatedTestDate(text: string, nowMs: number, field = 'testedAt'): string {
  const s = text.trim();
  const m = ISO.exec(s);
  if (!m) {
    const hint = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?$/.test(s)
      ? ' (add the UTC offset, e.g. Z or +01:00)'
      : '';
    throw new InputError(
      `"${text}" is not an ISO 8601 date or date-time with a UTC offset${hint}`,
      { field },
    );
  }
  const [, y, mo, d, hh, mi, ss] = m;
  const day = new Date(Date.UTC(Number(y), Number(mo) - 1, Number(d)));
  if (
    day.getUTCFullYear() !== Number(y) ||
    day.getUTCMonth() !== Number(mo) - 1 ||
    day.getUTCDate() !== Number(d)
  ) {
    throw new InputError(`"${text}" is not a calendar date`, { field });
  }
  if (
    hh !== undefined &&
    (Number(hh) > 23 || Number(mi) > 59 || (ss !== undefined && Number(ss) > 59))
  ) {
    throw new InputError(`"${text}" is not a time of day`, { field });
  }
  const ms = Date.parse(hh === undefined ? `${y}-${mo}-${d}T00:00:00Z` : s.replace(' ', 'T'));
  if (!Number.isFinite(ms)) throw new InputError(`"${text}" is not a date`, { field });
  if (ms > nowMs + TEST_DATE_SKEW_MS)
    throw new InputError(
      `${new Date(ms).toISOString()} is in the future; state when the test was run`,
      { field },
    );
  if (ms < Date.parse(EARLIEST_TEST_DATE))
    throw new InputError(
      `${new Date(ms).toISOString()} is before 1990, earlier than such a logger could have recorded`,
      { field },
    );
  return new Date(ms).toISOString();
}

/** When neither a stated date nor a dated log gives one: the upload is refused, naming the field. */
export function undatedTestError(fileName: string): InputError {
  return new InputError(
    'the log has only elapsed time and no date: state when the test was run in testedAt (ISO 8601)',
    { file: fileName, field: 'testedAt' },
  );
}

/** Preamble keys that state when logging started (common practice in logger exports: "Started: …"). */
const START_KEYS =
  /^(start|started|start time|started at|start date|test start|test started|logging started|log start)$/i;
const ISO_WITH_OFFSET =
  /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

/**
 * The test's date from the log itself: the fitted window's first reading on the log's own clock
 * (`window.startTime`), else, for a log in elapsed time whose preamble states when logging started
 * ("Started: 2024-10-07T08:00:00Z", with a UTC offset), that start plus the window's offset (the
 * start is taken as the first reading's time). Null when the log gives no clock at all.
 */
export function logTestDate(
  window: { startS: number; startTime?: unknown },
  metadata: unknown,
): string | null {
  if (typeof window.startTime === 'string') return window.startTime;
  if (!Array.isArray(metadata)) return null;
  for (const m of metadata as { key?: unknown; value?: unknown }[]) {
    if (typeof m?.key !== 'string' || typeof m.value !== 'string' || !START_KEYS.test(m.key.trim()))
      continue;
    const v = m.value.trim();
    if (!ISO_WITH_OFFSET.test(v)) continue;
    const ms = Date.parse(v.replace(' ', 'T'));
    if (Number.isFinite(ms) && Number.isFinite(window.startS))
      return new Date(ms + window.startS * 1000).toISOString();
  }
  return null;
}
