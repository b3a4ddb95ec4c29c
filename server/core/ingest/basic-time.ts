/**
 * ISO 8601 basic format, as plant historians write it: "20260611T070000Z",
 * "20260611T070000.250+0100", "20260611T0700" (ISO 8601-1:2019, 5.4.2 and 5.4.1: date and time
 * without separators, "T" between them, "Z" or ±hhmm / ±hh for the offset). Fills the same
 * DateTimeParts as the extended-format scanner, so the rest of the reader needs nothing new.
 */
import type { DateTimeParts } from './datetime.js';

const D0 = 48;

function digits(s: string, a: number, n: number): number {
  let v = 0;
  for (let i = a; i < a + n; i++) {
    const c = s.charCodeAt(i) - D0;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

/** Reads s[a, b) as a basic-format date-time into p; false when it is not one. */
export function scanBasicIso(s: string, a: number, b: number, p: DateTimeParts): boolean {
  while (a < b && (s.charCodeAt(a) === 32 || s.charCodeAt(a) === 9)) a++;
  while (b > a && (s.charCodeAt(b - 1) === 32 || s.charCodeAt(b - 1) === 9)) b--;
  // YYYYMMDDThhmm at the least
  if (b - a < 13 || (s.charCodeAt(a + 8) !== 84 && s.charCodeAt(a + 8) !== 116)) return false; // T or t
  const y = digits(s, a, 4),
    mo = digits(s, a + 4, 2),
    d = digits(s, a + 6, 2);
  const h = digits(s, a + 9, 2),
    mi = digits(s, a + 11, 2);
  if (y < 0 || mo < 0 || d < 0 || h < 0 || mi < 0) return false;
  let i = a + 13;
  let sec = 0,
    ms = 0;
  if (i + 2 <= b && digits(s, i, 2) >= 0) {
    sec = digits(s, i, 2);
    i += 2;
    if (i < b && (s.charCodeAt(i) === 46 || s.charCodeAt(i) === 44)) {
      // decimal fraction of the second
      i++;
      let scale = 100,
        any = false;
      while (i < b && s.charCodeAt(i) >= D0 && s.charCodeAt(i) <= D0 + 9) {
        ms += (s.charCodeAt(i) - D0) * scale;
        scale /= 10;
        i++;
        any = true;
      }
      if (!any) return false;
    }
  }
  let offset = NaN;
  if (i < b) {
    const c = s.charCodeAt(i);
    if ((c === 90 || c === 122) && i + 1 === b)
      offset = 0; // Z
    else if (c === 43 || c === 45) {
      const len = b - i - 1;
      const oh = len >= 2 ? digits(s, i + 1, 2) : -1;
      const om = len === 4 ? digits(s, i + 3, 2) : len === 2 ? 0 : -1;
      if (oh < 0 || om < 0 || oh > 23 || om > 59) return false;
      offset = (c === 45 ? -1 : 1) * (oh * 60 + om);
    } else return false;
  }
  p.hasDate = true;
  p.hasTime = true;
  p.yearFirst = true;
  p.n1 = y;
  p.n2 = mo;
  p.n3 = d;
  p.n3Digits = 2;
  p.hour = h;
  p.minute = mi;
  p.second = sec;
  p.ms = Math.round(ms);
  p.meridiem = 0;
  p.offsetMin = offset;
  return true;
}
