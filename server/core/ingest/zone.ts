/**
 * Local wall-clock times to instants in an IANA zone, using only Intl.DateTimeFormat.
 * Offsets are looked up once per wall-clock hour and cached: a million one-second rows cost a
 * few hundred look-ups.
 */
import { InputError } from '../errors.js';
import { daysFromCivil } from './datetime.js';

const HOUR = 3_600_000;
const WINDOW = 26 * HOUR;

export type Resolution = 'ok' | 'repeated' | 'skipped';

export class ZoneResolver {
  private readonly fmt: Intl.DateTimeFormat;
  private readonly cache = new Map<number, number[]>();
  /** How the last call resolved. */
  last: Resolution = 'ok';

  constructor(
    readonly zone: string,
    fileName: string,
  ) {
    try {
      this.fmt = new Intl.DateTimeFormat('en-US', {
        timeZone: zone,
        hourCycle: 'h23',
        year: 'numeric',
        month: 'numeric',
        day: 'numeric',
        hour: 'numeric',
        minute: 'numeric',
        second: 'numeric',
      });
    } catch {
      throw new InputError(
        `unknown time zone "${zone}" (give an IANA name such as Europe/Lisbon)`,
        {
          file: fileName,
          field: 'tz',
        },
      );
    }
  }

  /** Offset east of UTC, ms, at an instant. */
  offsetAt(instantMs: number): number {
    const t = Math.floor(instantMs / 1000) * 1000;
    let y = 0,
      mo = 0,
      d = 0,
      h = 0,
      mi = 0,
      s = 0;
    for (const part of this.fmt.formatToParts(t)) {
      const v = Number(part.value);
      switch (part.type) {
        case 'year':
          y = v;
          break;
        case 'month':
          mo = v;
          break;
        case 'day':
          d = v;
          break;
        case 'hour':
          h = v;
          break;
        case 'minute':
          mi = v;
          break;
        case 'second':
          s = v;
          break;
      }
    }
    return daysFromCivil(y, mo, d) * 86400000 + ((h * 60 + mi) * 60 + s) * 1000 - t;
  }

  /**
   * The instant a wall time names. In the repeated hour after clocks go back both readings
   * exist: take the earlier one unless it would run backwards past `notBefore` (rows come in
   * time order). In the hour skipped when clocks go forward there is none: NaN.
   */
  resolve(wall: number, notBefore: number): number {
    const bucket = Math.floor(wall / HOUR);
    let offs = this.cache.get(bucket);
    if (!offs) {
      // The instant lies within 14 h of the wall time (the largest offsets); the offsets in
      // force 26 h either side cover that with margin, and zones change offset months apart.
      // When they differ, find the transition instant to the second by bisection.
      const lo = wall - WINDOW,
        hi = wall + WINDOW,
        a = this.offsetAt(lo),
        b = this.offsetAt(hi);
      if (a === b) offs = [a];
      else {
        let l = lo,
          r = hi;
        while (r - l > 1000) {
          const m = Math.floor((l + r) / 2000) * 1000;
          if (this.offsetAt(m) === a) l = m;
          else r = m;
        }
        offs = [a, b, r];
      }
      this.cache.set(bucket, offs);
    }
    if (offs.length === 1) {
      this.last = 'ok';
      return wall - offs[0];
    }
    const [a, b, transition] = offs;
    const before = wall - a,
      after = wall - b;
    const okBefore = before < transition,
      okAfter = after >= transition;
    if (!okBefore && !okAfter) {
      this.last = 'skipped';
      return NaN;
    }
    if (okBefore !== okAfter) {
      this.last = 'ok';
      return okBefore ? before : after;
    }
    this.last = 'repeated';
    return before >= notBefore ? before : after;
  }
}

/**
 * An IANA zone name checked with Intl and returned in its canonical spelling ("europe/lisbon" →
 * "Europe/Lisbon"); a clear InputError naming `field` otherwise. Fixed offsets ("+01:00") and
 * "UTC" are accepted: Intl knows them.
 */
export function checkTimeZone(zone: unknown, field = 'timeZone'): string {
  if (typeof zone !== 'string' || zone.trim() === '' || zone.length > 64)
    throw new InputError('give a time zone by its IANA name, e.g. Europe/Lisbon or UTC', { field });
  try {
    return new Intl.DateTimeFormat('en-US', { timeZone: zone.trim() }).resolvedOptions().timeZone;
  } catch {
    throw new InputError(`unknown time zone "${zone}" (give an IANA name such as Europe/Lisbon)`, {
      field,
    });
  }
}
