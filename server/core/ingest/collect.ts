/**
 * The one pass over all data rows: time and the measured value of every row into
 * preallocated typed arrays. A row whose cells cannot be read is skipped and counted; past a
 * small fraction of the rows the file is refused, naming the first bad cell.
 */
import { InputError } from '../errors.js';
import { clockMs, isoZuluMs, newParts, scanDateTime, wallMs } from './datetime.js';
import { parseGroupedNumber, parseNumber } from './numbers.js';
import { scanBasicIso } from './basic-time.js';
import { MAX_BAD_ROW_FRACTION } from './options.js';
import type { Plan } from './plan.js';
import { forEachRow, type Row, type RowSource } from './rows.js';
import { ZoneResolver } from './zone.js';

export interface Collected {
  n: number;
  /** Epoch ms (absolute logs) or ms from the log's zero (relative logs). */
  timeMs: Float64Array;
  /** The measured value in its own unit. */
  value: Float64Array;
  temp: Float64Array | null;
  line: Int32Array;
  rows: number;
  badRows: number;
  badLines: number[];
  outOfOrder: boolean;
  withOffset: number;
  local: number;
  repeated: number;
  /** First row whose time is 55–60 minutes before the previous row's (a clock set back), or null. */
  hourBack: { line: number; stepS: number } | null;
}

const DAY = 86_400_000;

/** Upper bound on the data rows: the count of line ends. */
export function countLines(bytes: Uint8Array): number {
  let lf = 0;
  for (let i = bytes.indexOf(10); i >= 0; i = bytes.indexOf(10, i + 1)) lf++;
  if (lf > 0) return lf + 1;
  let cr = 0;
  for (let i = bytes.indexOf(13); i >= 0; i = bytes.indexOf(13, i + 1)) cr++;
  return cr + 1;
}

export function collect(
  rs: RowSource,
  plan: Plan,
  names: string[],
  decimal: '.' | ',',
  zone: ZoneResolver | null,
  capacity: number,
  group = '',
): Collected {
  const fileName = rs.fileName;
  const timeMs = new Float64Array(capacity);
  const value = new Float64Array(capacity);
  const tcol = plan.temperature?.col ?? -1;
  const temp = tcol >= 0 ? new Float64Array(capacity) : null;
  const line = new Int32Array(capacity);
  const vcol = plan.value.col;
  const tp = plan.time;
  const timeCols = tp.kind === 'date+clock' ? [tp.dateCol, tp.clockCol] : [tp.col];
  const need = Math.max(vcol, tcol, ...timeCols) + 1;
  const dec = decimal.charCodeAt(0);
  const grp = group ? group.charCodeAt(0) : 0;
  const p = newParts();
  const allowed = Math.max(1, Math.floor(MAX_BAD_ROW_FRACTION * capacity));
  let n = 0,
    rows = 0,
    bad = 0,
    withOffset = 0,
    local = 0,
    repeated = 0;
  let latest = -Infinity,
    outOfOrder = false,
    prevClock = -Infinity,
    dayAdd = 0,
    prevT = NaN;
  let hourBack: Collected['hourBack'] = null;
  let first: { line: number; field: string; text: string; why: string } | null = null;
  const badLines: number[] = [];

  const refuse = (): never => {
    const f = first!;
    const shown = f.text.slice(0, 40).replace(/[\x00-\x1f]+/g, ' ');
    throw new InputError(
      `${f.why} (cell "${shown}"); ${bad} of ${rows} rows unreadable, more than ${MAX_BAD_ROW_FRACTION * 100} % allowed`,
      { file: fileName, line: f.line, field: f.field },
    );
  };
  const cell = (r: Row, c: number) => r.src[c].slice(r.start[c], r.end[c]);
  const markBad = (r: Row, c: number, why: string): void => {
    bad++;
    if (badLines.length < 5) badLines.push(r.line);
    if (!first)
      first = {
        line: r.line,
        field: names[c] ?? `column ${c + 1}`,
        text: c < r.count ? cell(r, c) : '',
        why,
      };
    if (bad > allowed) refuse();
  };

  const timeOf = (r: Row): number => {
    if (tp.kind === 'number') {
      const v = parseNumber(r.src[tp.col], r.start[tp.col], r.end[tp.col], dec);
      return v * tp.scaleMs + tp.offsetMs;
    }
    if (tp.kind === 'clock') {
      if (!scanDateTime(r.src[tp.col], r.start[tp.col], r.end[tp.col], p) || p.hasDate) return NaN;
      const ms = clockMs(p);
      if (ms < prevClock - DAY / 2) dayAdd += DAY; // ran back past midnight
      prevClock = ms;
      return ms + dayAdd;
    }
    let wall: number;
    if (tp.kind === 'text') {
      const utc = isoZuluMs(r.src[tp.col], r.start[tp.col], r.end[tp.col]);
      if (utc === utc) {
        withOffset++;
        return utc;
      }
      if (
        !(
          scanDateTime(r.src[tp.col], r.start[tp.col], r.end[tp.col], p) ||
          scanBasicIso(r.src[tp.col], r.start[tp.col], r.end[tp.col], p)
        ) ||
        !p.hasDate
      )
        return NaN;
      wall = wallMs(p, tp.order);
    } else {
      if (!scanDateTime(r.src[tp.dateCol], r.start[tp.dateCol], r.end[tp.dateCol], p) || !p.hasDate)
        return NaN;
      p.hasTime = false;
      const day = wallMs(p, tp.order);
      if (
        !scanDateTime(r.src[tp.clockCol], r.start[tp.clockCol], r.end[tp.clockCol], p) ||
        p.hasDate
      )
        return NaN;
      wall = day + clockMs(p);
    }
    if (Number.isNaN(wall)) return NaN;
    if (!Number.isNaN(p.offsetMin)) {
      withOffset++;
      return wall - p.offsetMin * 60_000;
    }
    local++;
    if (!zone) return wall;
    const t = zone.resolve(wall, latest);
    if (zone.last === 'skipped')
      throw new InputError(
        `${cell(r, timeCols[timeCols.length - 1])} does not exist in ${zone.zone}: the clocks skipped that hour (is the log in standard time all year? then give a fixed-offset zone)`,
        { file: fileName, line: r.line, field: names[timeCols[timeCols.length - 1]] },
      );
    if (zone.last === 'repeated') repeated++;
    return t;
  };

  const tagCol = plan.tagFilter?.col ?? -1;
  const tag = plan.tagFilter?.tag ?? '';
  forEachRow(rs, (r) => {
    // long format: only the rows of the tag being read
    if (
      tagCol >= 0 &&
      (tagCol >= r.count || r.src[tagCol].slice(r.start[tagCol], r.end[tagCol]).trim() !== tag)
    )
      return;
    rows++;
    if (r.count < need) {
      markBad(r, r.count, `row has ${r.count} fields, ${need} needed`);
      return;
    }
    const t = timeOf(r);
    if (!Number.isFinite(t) || Math.abs(t) > 8.64e15) {
      // the range of a JavaScript Date
      markBad(r, timeCols[0], 'not a time');
      return;
    }
    const v = grp
      ? parseGroupedNumber(r.src[vcol], r.start[vcol], r.end[vcol], dec, grp)
      : parseNumber(r.src[vcol], r.start[vcol], r.end[vcol], dec);
    if (!Number.isFinite(v)) {
      markBad(r, vcol, 'not a number');
      return;
    }
    if (temp) {
      const tv = grp
        ? parseGroupedNumber(r.src[tcol], r.start[tcol], r.end[tcol], dec, grp)
        : parseNumber(r.src[tcol], r.start[tcol], r.end[tcol], dec);
      if (!Number.isFinite(tv)) {
        markBad(r, tcol, 'temperature is not a number');
        return;
      }
      temp[n] = tv;
    }
    if (t < latest) outOfOrder = true;
    else latest = t;
    // A step back by (nearly) one hour from the row before: the clocks went back.
    const back = prevT - t;
    if (!hourBack && back >= 3_300_000 && back <= 3_601_000)
      hourBack = { line: r.line, stepS: back / 1000 };
    prevT = t;
    timeMs[n] = t;
    value[n] = v;
    line[n] = r.line;
    n++;
  });
  if (first && bad > Math.max(1, Math.floor(MAX_BAD_ROW_FRACTION * rows))) refuse();
  return {
    n,
    timeMs,
    value,
    temp,
    line,
    rows,
    badRows: bad,
    badLines,
    outOfOrder,
    withOffset,
    local,
    repeated,
    hourBack,
  };
}
