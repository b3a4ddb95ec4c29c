/**
 * Calendar dates and clock times as loggers write them: ISO 8601 with or without an offset,
 * "YYYY-MM-DD hh:mm:ss.fff", day-first or month-first dates with / . or - separators, 12-hour
 * clocks with AM/PM, a date alone or a clock alone. The scanner only splits the text into
 * numbers; which number is the day is decided later (wallMs) so one scan serves every order.
 */
import type { DateOrder } from './options.js';

export interface DateTimeParts {
  hasDate: boolean;
  hasTime: boolean;
  /** The date starts with a four-digit year. */
  yearFirst: boolean;
  /** The three date numbers in written order, and the digit count of the third. */
  n1: number;
  n2: number;
  n3: number;
  n3Digits: number;
  hour: number;
  minute: number;
  second: number;
  ms: number;
  /** 0 none, 1 AM, 2 PM. */
  meridiem: number;
  /** Offset east of UTC in minutes, NaN when the text gives none. */
  offsetMin: number;
  /** Scanner cursor and the digit count of the last number read: kept in the caller's parts
   * object (reused per cell) rather than in module state, so scans share nothing. */
  pos: number;
  digits: number;
}

export function newParts(): DateTimeParts {
  return {
    hasDate: false,
    hasTime: false,
    yearFirst: false,
    n1: 0,
    n2: 0,
    n3: 0,
    n3Digits: 0,
    hour: 0,
    minute: 0,
    second: 0,
    ms: 0,
    meridiem: 0,
    offsetMin: NaN,
    pos: 0,
    digits: 0,
  };
}

const D0 = 48,
  D9 = 57,
  COLON = 58,
  SPACE = 32;

function isDigit(c: number): boolean {
  return c >= D0 && c <= D9;
}

function digitsAt(s: string, b: number, max: number, p: DateTimeParts): number {
  let v = 0,
    n = 0;
  while (p.pos < b && n < max && isDigit(s.charCodeAt(p.pos))) {
    v = v * 10 + (s.charCodeAt(p.pos) - D0);
    p.pos++;
    n++;
  }
  p.digits = n;
  return v;
}

function skipSpaces(s: string, b: number, p: DateTimeParts): void {
  while (p.pos < b && (s.charCodeAt(p.pos) === SPACE || s.charCodeAt(p.pos) === 9)) p.pos++;
}

/** Split s[a, b) into date and time numbers; false when it is not a date/time at all. */
export function scanDateTime(s: string, a: number, b: number, p: DateTimeParts): boolean {
  p.pos = a;
  skipSpaces(s, b, p);
  while (b > p.pos && (s.charCodeAt(b - 1) === SPACE || s.charCodeAt(b - 1) === 9)) b--;
  p.hasDate = p.hasTime = p.yearFirst = false;
  p.hour = p.minute = p.second = p.ms = p.meridiem = 0;
  p.offsetMin = NaN;
  const start = p.pos;
  const first = digitsAt(s, b, 4, p);
  const d1 = p.digits;
  if (d1 === 0 || p.pos >= b) return false;
  const sep = s.charCodeAt(p.pos);
  if (sep === 45 || sep === 47 || sep === 46) {
    // - / .
    p.pos++;
    const second = digitsAt(s, b, 2, p);
    if (p.digits === 0 || p.pos >= b || s.charCodeAt(p.pos) !== sep) return false;
    p.pos++;
    const third = digitsAt(s, b, 4, p);
    if (p.digits === 0) return false;
    p.hasDate = true;
    p.yearFirst = d1 === 4;
    p.n1 = first;
    p.n2 = second;
    p.n3 = third;
    p.n3Digits = p.digits;
    if (p.yearFirst ? p.digits > 2 : p.digits === 3) return false;
    if (p.pos >= b) return true;
    const c = s.charCodeAt(p.pos);
    if (c === 84 || c === 116)
      p.pos++; // T
    else if (c === SPACE || c === 9 || c === 44) {
      p.pos++;
      skipSpaces(s, b, p);
    } else return false;
    if (p.pos >= b) return false;
    return scanClock(s, b, p);
  }
  if (sep === COLON && d1 <= 2) {
    p.pos = start;
    return scanClock(s, b, p);
  }
  return false;
}

function scanClock(s: string, b: number, p: DateTimeParts): boolean {
  p.hour = digitsAt(s, b, 2, p);
  if (p.digits === 0 || p.pos >= b || s.charCodeAt(p.pos) !== COLON) return false;
  p.pos++;
  p.minute = digitsAt(s, b, 2, p);
  if (p.digits !== 2) return false;
  if (p.pos < b && s.charCodeAt(p.pos) === COLON) {
    p.pos++;
    p.second = digitsAt(s, b, 2, p);
    if (p.digits !== 2) return false;
    const c = s.charCodeAt(p.pos);
    if (p.pos < b && (c === 46 || c === 44)) {
      p.pos++;
      let scale = 100,
        ms = 0,
        n = 0;
      while (p.pos < b && isDigit(s.charCodeAt(p.pos))) {
        ms += (s.charCodeAt(p.pos) - D0) * scale;
        scale /= 10;
        p.pos++;
        n++;
      }
      if (n === 0) return false;
      p.ms = ms;
    }
  }
  p.hasTime = true;
  skipSpaces(s, b, p);
  if (p.pos >= b) return true;
  const c = s.charCodeAt(p.pos) | 32; // lower case
  if ((c === 97 || c === 112) && p.pos + 1 < b) {
    // a / p, then m or .m.
    const pm = c === 112;
    let q = p.pos + 1;
    if (s.charCodeAt(q) === 46) q++;
    if (q < b && (s.charCodeAt(q) | 32) === 109) {
      q++;
      if (q < b && s.charCodeAt(q) === 46) q++;
      p.meridiem = pm ? 2 : 1;
      p.pos = q;
      skipSpaces(s, b, p);
      if (p.pos >= b) return true;
    }
  }
  return scanOffset(s, b, p);
}

function scanOffset(s: string, b: number, p: DateTimeParts): boolean {
  let c = s.charCodeAt(p.pos);
  if (c === 90 || c === 122) {
    // Z
    p.offsetMin = 0;
    p.pos++;
    return p.pos === b;
  }
  if ((c | 32) === 117 || (c | 32) === 103) {
    // "UTC" or "GMT", optionally followed by an offset
    const word = s.slice(p.pos, p.pos + 3).toUpperCase();
    if (word !== 'UTC' && word !== 'GMT') return false;
    p.pos += 3;
    p.offsetMin = 0;
    skipSpaces(s, b, p);
    if (p.pos >= b) return true;
    c = s.charCodeAt(p.pos);
  }
  if (c !== 43 && c !== 45 && c !== 0x2212) return false;
  const sign = c === 43 ? 1 : -1;
  p.pos++;
  const hh = digitsAt(s, b, 2, p);
  if (p.digits !== 2) return false;
  let mm = 0;
  if (p.pos < b && s.charCodeAt(p.pos) === COLON) p.pos++;
  if (p.pos < b) {
    mm = digitsAt(s, b, 2, p);
    if (p.digits !== 2) return false;
  }
  if (p.pos !== b || hh > 18 || mm > 59) return false;
  p.offsetMin = sign * (hh * 60 + mm);
  return true;
}

/**
 * The common logger form "YYYY-MM-DDThh:mm:ss[.fff]Z" in s[a, b) as epoch ms, or NaN for any
 * other text (which then goes through scanDateTime and wallMs, giving the same value for this
 * form). A small function of its own, so the JIT optimises it after a few rows.
 */
export function isoZuluMs(s: string, a: number, b: number): number {
  const len = b - a;
  if (
    (len !== 20 && len !== 24) ||
    s.charCodeAt(a + 4) !== 45 ||
    s.charCodeAt(a + 7) !== 45 ||
    s.charCodeAt(a + 10) !== 84 ||
    s.charCodeAt(a + 13) !== COLON ||
    s.charCodeAt(a + 16) !== COLON ||
    s.charCodeAt(b - 1) !== 90
  )
    return NaN;
  // Small integers only (no NaN in the arithmetic): digit values, and a flag for any non-digit
  // (a character below '0' makes the OR negative).
  const c0 = s.charCodeAt(a) - D0,
    c1 = s.charCodeAt(a + 1) - D0,
    c2 = s.charCodeAt(a + 2) - D0,
    c3 = s.charCodeAt(a + 3) - D0;
  const c5 = s.charCodeAt(a + 5) - D0,
    c6 = s.charCodeAt(a + 6) - D0,
    c8 = s.charCodeAt(a + 8) - D0,
    c9 = s.charCodeAt(a + 9) - D0;
  const c11 = s.charCodeAt(a + 11) - D0,
    c12 = s.charCodeAt(a + 12) - D0,
    c14 = s.charCodeAt(a + 14) - D0,
    c15 = s.charCodeAt(a + 15) - D0;
  const c17 = s.charCodeAt(a + 17) - D0,
    c18 = s.charCodeAt(a + 18) - D0;
  let bad =
    (c0 | c1 | c2 | c3 | c5 | c6 | c8 | c9 | c11 | c12 | c14 | c15 | c17 | c18) < 0 ||
    c0 > 9 ||
    c1 > 9 ||
    c2 > 9 ||
    c3 > 9 ||
    c5 > 9 ||
    c6 > 9 ||
    c8 > 9 ||
    c9 > 9 ||
    c11 > 9 ||
    c12 > 9 ||
    c14 > 9 ||
    c15 > 9 ||
    c17 > 9 ||
    c18 > 9;
  let ms = 0;
  if (len === 24) {
    const f0 = s.charCodeAt(a + 20) - D0,
      f1 = s.charCodeAt(a + 21) - D0,
      f2 = s.charCodeAt(a + 22) - D0;
    bad =
      bad ||
      s.charCodeAt(a + 19) !== 46 ||
      f0 < 0 ||
      f0 > 9 ||
      f1 < 0 ||
      f1 > 9 ||
      f2 < 0 ||
      f2 > 9;
    ms = f0 * 100 + f1 * 10 + f2;
  }
  if (bad) return NaN;
  const y = c0 * 1000 + c1 * 100 + c2 * 10 + c3,
    m = c5 * 10 + c6,
    d = c8 * 10 + c9;
  const h = c11 * 10 + c12,
    mi = c14 * 10 + c15,
    sec = c17 * 10 + c18;
  if (
    y < 1900 ||
    y > 2200 ||
    m < 1 ||
    m > 12 ||
    d < 1 ||
    d > daysIn(y, m) ||
    h > 23 ||
    mi > 59 ||
    sec > 59
  )
    return NaN;
  return daysFromCivil(y, m, d) * 86400000 + (((h * 60 + mi) * 60 + sec) * 1000 + ms);
}

/** Days from 1970-01-01 to a proleptic Gregorian date (Hinnant's days_from_civil). */
export function daysFromCivil(y: number, m: number, d: number): number {
  y -= m <= 2 ? 1 : 0;
  const era = Math.floor(y / 400);
  const yoe = y - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function daysIn(y: number, m: number): number {
  return m === 2 && ((y % 4 === 0 && y % 100 !== 0) || y % 400 === 0) ? 29 : MONTH_DAYS[m - 1];
}

/** Milliseconds of the clock part, or NaN when it is not a valid time of day. */
export function clockMs(p: DateTimeParts): number {
  let h = p.hour;
  if (p.meridiem) {
    if (h < 1 || h > 12) return NaN;
    h = (h % 12) + (p.meridiem === 2 ? 12 : 0);
  } else if (h > 23) return NaN;
  if (p.minute > 59 || p.second > 59) return NaN;
  return ((h * 60 + p.minute) * 60 + p.second) * 1000 + p.ms;
}

/**
 * The written date and time as milliseconds since 1970-01-01 00:00 on the same wall clock
 * (no offset applied), or NaN when the date is invalid in this order.
 */
export function wallMs(p: DateTimeParts, order: DateOrder): number {
  let y: number, m: number, d: number;
  if (p.yearFirst || order === 'ymd') {
    y = p.n1;
    m = p.n2;
    d = p.n3;
    if (!p.yearFirst) y += y < 70 ? 2000 : 1900;
  } else {
    y = p.n3;
    if (order === 'dmy') {
      d = p.n1;
      m = p.n2;
    } else {
      m = p.n1;
      d = p.n2;
    }
    // Two-digit years: 70–99 are 19xx, 00–69 are 20xx (common practice, as in POSIX strptime %y).
    if (p.n3Digits === 2) y += y < 70 ? 2000 : 1900;
  }
  if (y < 1900 || y > 2200 || m < 1 || m > 12 || d < 1 || d > daysIn(y, m)) return NaN;
  const day = daysFromCivil(y, m, d) * 86400000;
  return p.hasTime ? day + clockMs(p) : day;
}
