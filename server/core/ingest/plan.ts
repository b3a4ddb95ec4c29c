/**
 * Which column is time, which is the measured quantity (and in what unit), which is
 * temperature: from header words first, then from what the first data rows look like.
 * Every choice carries its reason, for `columns` and `notes`.
 */
import { InputError } from '../errors.js';
import { lengthFactorToM, pressureFactorToPa, temperatureUnit } from '../units/index.js';
import { newParts, scanDateTime } from './datetime.js';
import { readHeader, timeUnitMs, type HeaderReading } from './header.js';
import type { Layout } from './layout.js';
import { parseGroupedNumber } from './numbers.js';
import { scanBasicIso } from './basic-time.js';
import type { TagColumns, TagSummary } from './long-format.js';
import type { DateOrder, Quantity, ReadOptions } from './options.js';
import type { ColumnRole, DetectedColumn, ReadNote } from './series.js';

/** A header cell as a one-line message shows it: control characters (a newline inside quotes) escaped. */
const shownName = (name: string): string => JSON.stringify(name).slice(1, -1);

export type TimePlan =
  | { kind: 'text'; col: number; order: DateOrder }
  | { kind: 'date+clock'; dateCol: number; clockCol: number; order: DateOrder }
  | { kind: 'clock'; col: number }
  | { kind: 'number'; col: number; scaleMs: number; offsetMs: number; absolute: boolean };

export interface ValuePlan {
  col: number;
  name: string;
  quantity: Quantity;
  unit: string;
  /** Metres (level, distance) or pascals (pressure) per one unit. */
  factor: number;
}

/** A long-format file's tag and unit columns, its tags, and the tag this pass reads. */
export interface LongPlan extends TagColumns {
  tag: TagSummary;
  tags: TagSummary[];
}

export interface Plan {
  time: TimePlan;
  /** Long format: only rows whose tag column holds this tag are read. */
  tagFilter: { col: number; tag: string } | null;
  /** Day/month order still to be decided from the whole file. */
  orderOpen: boolean;
  value: ValuePlan;
  temperature: { col: number; name: string; unit: string } | null;
  columns: DetectedColumn[];
  notes: ReadNote[];
  warnings: ReadNote[];
}

type DataKind = 'number' | 'datetime' | 'date' | 'clock' | 'text' | 'empty';

const parts = newParts();

function dataKind(
  layout: Layout,
  col: number,
): {
  kind: DataKind;
  maxAbs: number;
  min: number;
  fractional: boolean;
  dmy: boolean;
  mdy: boolean;
  dayMonth: boolean;
} {
  const dec = layout.decimal.charCodeAt(0);
  const grp = layout.group ? layout.group.charCodeAt(0) : 0;
  const counts: Record<DataKind, number> = {
    number: 0,
    datetime: 0,
    date: 0,
    clock: 0,
    text: 0,
    empty: 0,
  };
  let maxAbs = 0,
    min = Infinity,
    fractional = false,
    dmy = false,
    mdy = false,
    dayMonth = false;
  for (const r of layout.sample) {
    const f = r.fields[col] ?? '';
    if (f.trim() === '') {
      counts.empty++;
      continue;
    }
    const v = parseGroupedNumber(f, 0, f.length, dec, grp);
    if (Number.isFinite(v)) {
      counts.number++;
      maxAbs = Math.max(maxAbs, Math.abs(v));
      min = Math.min(min, v);
      if (!Number.isInteger(v)) fractional = true;
      continue;
    }
    if (scanDateTime(f, 0, f.length, parts) || scanBasicIso(f, 0, f.length, parts)) {
      if (parts.hasDate && !parts.yearFirst) {
        dayMonth = true;
        if (parts.n1 > 12) dmy = true;
        if (parts.n2 > 12) mdy = true;
      }
      counts[parts.hasDate ? (parts.hasTime ? 'datetime' : 'date') : 'clock']++;
      continue;
    }
    counts.text++;
  }
  let kind: DataKind = 'empty',
    best = 0;
  for (const k of ['number', 'datetime', 'date', 'clock', 'text'] as DataKind[])
    if (counts[k] > best) {
      kind = k;
      best = counts[k];
    }
  return { kind, maxAbs, min, fractional, dmy, mdy, dayMonth };
}

function pickColumn(
  sel: string | number,
  names: string[],
  fileName: string,
  field: string,
): number {
  if (typeof sel === 'number') {
    if (!Number.isInteger(sel) || sel < 1 || sel > names.length)
      throw new InputError(`column ${sel} does not exist: the file has ${names.length} columns`, {
        file: fileName,
        field,
      });
    return sel - 1;
  }
  const want = sel.trim().toLowerCase();
  const i = names.findIndex((n) => n.toLowerCase() === want);
  if (i >= 0) return i;
  if (/^\d+$/.test(want)) return pickColumn(Number(want), names, fileName, field);
  throw new InputError(
    `no column named "${sel}" (columns: ${names.map((n) => `"${n}"`).join(', ')})`,
    { file: fileName, field },
  );
}

export function makePlan(
  layout: Layout,
  opts: ReadOptions,
  fileName: string,
  forBaro = false,
  long: LongPlan | null = null,
): Plan {
  const notes: ReadNote[] = [];
  const warnings: ReadNote[] = [];
  const n = layout.fieldCount;
  const heads: HeaderReading[] = layout.names.map((h) => readHeader(h));
  const kinds = Array.from({ length: n }, (_, i) => dataKind(layout, i));
  const roles: (ColumnRole | null)[] = new Array(n).fill(null);
  const reasons: string[] = heads.map((h) => h.reason);

  // ---- time
  let time: TimePlan | null = null;
  let orderSeen = { dmy: false, mdy: false, dayMonth: false };
  const timeFrom = (c: number, why: string): TimePlan => {
    const k = kinds[c],
      h = heads[c];
    orderSeen = k;
    if (k.kind === 'datetime') {
      roles[c] = 'time';
      reasons[c] += `; ${why}, values are dates with times`;
      return { kind: 'text', col: c, order: 'ymd' };
    }
    if (k.kind === 'date') {
      const clock = kinds.findIndex((kk, j) => j !== c && kk.kind === 'clock');
      if (clock < 0)
        throw new InputError(
          `column "${shownName(layout.names[c])}" holds dates without times, and no column holds clock times`,
          { file: fileName, field: layout.names[c] },
        );
      roles[c] = 'date';
      roles[clock] = 'clock';
      reasons[c] += `; ${why}, values are dates`;
      reasons[clock] += '; values are clock times, joined to the date column';
      notes.push({
        code: 'time-format',
        message: `time from the date column "${layout.names[c]}" and the clock column "${layout.names[clock]}"`,
      });
      return { kind: 'date+clock', dateCol: c, clockCol: clock, order: 'ymd' };
    }
    if (k.kind === 'clock') {
      roles[c] = 'time';
      reasons[c] += `; ${why}, values are clock times without dates`;
      notes.push({
        code: 'time-format',
        message: `"${layout.names[c]}" holds clock times only: time is relative, and a clock running back past midnight adds a day`,
      });
      return { kind: 'clock', col: c };
    }
    if (k.kind !== 'number')
      throw new InputError(
        `column "${shownName(layout.names[c])}" does not hold times (${k.kind} values)`,
        {
          file: fileName,
          field: layout.names[c],
        },
      );
    roles[c] = 'time';
    const unitMs = h.unit ? timeUnitMs(h.unit) : null;
    const say = (m: string) => {
      reasons[c] += `; ${m}`;
      notes.push({ code: 'time-format', message: `"${layout.names[c]}": ${m}` });
    };
    if (
      h.timeKind === 'epoch' ||
      (h.timeKind !== 'elapsed' && unitMs === null && k.maxAbs >= 1e8)
    ) {
      const ms = unitMs === 1 || (unitMs === null && k.maxAbs >= 1e11);
      say(
        ms
          ? `epoch milliseconds (${unitMs === 1 ? 'unit ms' : 'values of 1e11 and more'})`
          : `epoch seconds (${unitMs === 1000 ? 'unit s' : 'values below 1e11'})`,
      );
      return { kind: 'number', col: c, scaleMs: ms ? 1 : 1000, offsetMs: 0, absolute: true };
    }
    // Serial day numbers 20000–120000 are the years 1954–2228. A header naming a date says so;
    // a bare "time" header needs fractional values that all lie in that range.
    const serialRange = k.min >= 2e4 && k.maxAbs < 1.2e5;
    if (
      unitMs === null &&
      serialRange &&
      (h.timeKind === 'absolute' ||
        h.timeKind === 'date' ||
        (h.timeKind === 'unknown' && k.fractional))
    ) {
      say('spreadsheet serial day numbers (1900 date system: day 25569 is 1970-01-01)');
      return {
        kind: 'number',
        col: c,
        scaleMs: 86_400_000,
        offsetMs: -25569 * 86_400_000,
        absolute: true,
      };
    }
    if (unitMs !== null) {
      say(`elapsed time in ${h.unit}`);
      return { kind: 'number', col: c, scaleMs: unitMs, offsetMs: 0, absolute: false };
    }
    say('elapsed time, assumed in seconds');
    warnings.push({
      code: 'time-unit-assumed',
      message: `"${layout.names[c]}" gives no time unit: read as seconds`,
    });
    return { kind: 'number', col: c, scaleMs: 1000, offsetMs: 0, absolute: false };
  };
  if (opts.timeColumn !== undefined) {
    time = timeFrom(
      pickColumn(opts.timeColumn, layout.names, fileName, 'timeColumn'),
      'named as the time column',
    );
  } else {
    const byHeader = (pred: (i: number) => boolean) =>
      heads.findIndex((h, i) => (h.role === 'time' || h.role === 'date') && pred(i));
    let c = byHeader((i) => kinds[i].kind === 'datetime');
    if (c < 0) c = kinds.findIndex((k) => k.kind === 'datetime');
    if (c < 0) c = kinds.findIndex((k) => k.kind === 'date');
    if (c < 0) c = byHeader((i) => kinds[i].kind === 'number');
    if (c < 0) c = kinds.findIndex((k) => k.kind === 'clock');
    if (c < 0)
      throw new InputError(
        'found no time column (dates, clock times, epoch or elapsed seconds); name it with --time-column',
        { file: fileName },
      );
    time = timeFrom(c, 'the time column');
  }

  // ---- day/month order
  let orderOpen = false;
  if (time.kind === 'text' || time.kind === 'date+clock') {
    if (opts.dateOrder) {
      time.order = opts.dateOrder;
      notes.push({ code: 'date-order', message: `dates read as ${opts.dateOrder}, as given` });
    } else if (orderSeen.dayMonth) {
      if (orderSeen.dmy && orderSeen.mdy)
        throw new InputError(
          'dates have a first number above 12 on some rows and a second on others: not one date order; give --date-order',
          { file: fileName },
        );
      if (orderSeen.dmy || orderSeen.mdy) {
        time.order = orderSeen.dmy ? 'dmy' : 'mdy';
        notes.push({
          code: 'date-order',
          message: `dates are ${orderSeen.dmy ? 'day-first: a first' : 'month-first: a second'} number is above 12`,
        });
      } else orderOpen = true;
    }
  }

  // ---- measured column
  const used = new Set<number>(roles.map((r, i) => (r ? i : -1)).filter((i) => i >= 0));
  if (long) {
    used.add(long.tagCol);
    reasons[long.tagCol] += '; names the tag of each row (one row per time and tag)';
    if (long.unitCol >= 0) {
      used.add(long.unitCol);
      reasons[long.unitCol] += "; gives the unit of each row's tag";
    }
  }
  const MEASURED: ColumnRole[] = forBaro
    ? ['absolute-pressure', 'gauge-pressure']
    : ['level', 'gauge-pressure', 'absolute-pressure', 'distance-from-top'];
  let vc = -1;
  if (!forBaro && opts.levelColumn !== undefined)
    vc = pickColumn(opts.levelColumn, layout.names, fileName, 'levelColumn');
  else if (long) vc = longValueColumn(layout, kinds, used, fileName);
  else {
    for (const role of MEASURED) {
      vc = heads.findIndex((h, i) => !used.has(i) && h.role === role && kinds[i].kind === 'number');
      if (vc >= 0) break;
    }
    if (vc < 0) {
      const numeric = kinds
        .map((k, i) => (k.kind === 'number' && !used.has(i) && heads[i].role === 'other' ? i : -1))
        .filter((i) => i >= 0);
      if (numeric.length === 1 && !forBaro && opts.unit) {
        vc = numeric[0];
        notes.push({
          code: 'level-column',
          message: `"${layout.names[vc]}" is the only numeric column left: read as the measured column`,
        });
      }
    }
    if (vc < 0) {
      const what = forBaro
        ? 'barometric pressure column'
        : 'numeric level, pressure or distance column';
      throw new InputError(`found no ${what}; name it with --level-column`, { file: fileName });
    }
  }
  const vName = layout.names[vc];
  if (kinds[vc].kind !== 'number')
    throw new InputError(
      `column "${shownName(vName)}" does not hold numbers (${kinds[vc].kind} values)`,
      {
        file: fileName,
        field: vName,
      },
    );
  // In long format the tag and its unit say what the value column holds, as a header would.
  const vh = long
    ? readHeader(long.tag.unit ? `${long.tag.tag} [${long.tag.unit}]` : long.tag.tag)
    : heads[vc];
  // Unit: the header's if it names one we know, else the one given.
  let unit: string;
  const givenUnit = forBaro ? undefined : opts.unit;
  if (vh.unit && (vh.unitKind === 'length' || vh.unitKind === 'pressure')) {
    unit = vh.unit;
    // A given unit that would be ignored is refused, not warned about: the person meant something.
    if (givenUnit && !sameUnit(givenUnit, vh.unit))
      throw new InputError(
        `unit "${givenUnit}" was given but the header of column "${vName}" already says "${vh.unit}": the given unit would be ignored; leave it out or correct the header`,
        { file: fileName, field: 'unit' },
      );
  } else if (givenUnit) {
    unit = givenUnit;
    notes.push({
      code: 'unit',
      message: `"${vName}" in ${givenUnit}, as given${vh.unit ? ` (header unit "${vh.unit}" not known)` : ''}`,
    });
  } else {
    throw new InputError(
      vh.unit
        ? `unit "${vh.unit}" of column "${vName}" is not a length or pressure unit we know; give --unit`
        : `column "${shownName(vName)}" gives no unit; give --unit (e.g. m, cm, mm, ft, kPa, psi)`,
      { file: fileName, field: vName },
    );
  }
  const len = lengthFactorToM(unit),
    pres = pressureFactorToPa(unit);
  if (len === null && pres === null)
    throw new InputError(`unit "${unit}" is not a length or pressure unit we know`, {
      file: fileName,
      field: vName,
    });
  let quantity: Quantity;
  const hasBaro = !!opts.baro || opts.baroTag !== undefined;
  if (forBaro) quantity = 'absolute-pressure';
  else if (opts.quantity) {
    quantity = opts.quantity;
    notes.push({ code: 'quantity', message: `"${vName}" read as ${quantity}, as given` });
  } else {
    const r = vh.role;
    if (r === 'gauge-pressure' || r === 'absolute-pressure')
      quantity = vh.pressureRef === null && hasBaro ? 'absolute-pressure' : r;
    else if (r === 'distance-from-top') quantity = r;
    else quantity = 'level';
    if (pres !== null && (quantity === 'level' || quantity === 'distance-from-top'))
      quantity = hasBaro ? 'absolute-pressure' : 'gauge-pressure';
    if (len !== null && (quantity === 'gauge-pressure' || quantity === 'absolute-pressure'))
      quantity = 'level';
    if (
      (quantity === 'gauge-pressure' || quantity === 'absolute-pressure') &&
      vh.pressureRef === null
    )
      notes.push({
        code: 'pressure-reference',
        message: `"${vName}" does not say gauge or absolute: read as ${quantity}${hasBaro ? ' because a barometric log was given' : ''} (override with --quantity)`,
      });
  }
  const isPressure = quantity === 'gauge-pressure' || quantity === 'absolute-pressure';
  const factor = isPressure ? pres : len;
  if (factor === null)
    throw new InputError(
      `unit "${unit}" does not fit ${quantity} (${isPressure ? 'a pressure' : 'a length'} unit is needed)`,
      { file: fileName, field: vName },
    );
  roles[vc] = quantity;
  reasons[vc] += `; read as ${quantity} in ${unit}`;
  notes.push({ code: 'level-column', message: `"${vName}" is the ${quantity} column, in ${unit}` });

  // ---- temperature
  let temperature: Plan['temperature'] = null;
  const tc = heads.findIndex(
    (h, i) => h.role === 'temperature' && i !== vc && !roles[i] && kinds[i].kind === 'number',
  );
  if (tc >= 0) {
    let tu = heads[tc].unit && temperatureUnit(heads[tc].unit!) ? heads[tc].unit! : null;
    if (!tu) {
      tu = 'C';
      notes.push({
        code: 'temperature-unit',
        message: `"${layout.names[tc]}" gives no temperature unit: read as °C`,
      });
    }
    roles[tc] = 'temperature';
    reasons[tc] += `; read as temperature in ${tu}`;
    notes.push({
      code: 'temperature-column',
      message: `"${layout.names[tc]}" is the temperature column, in ${tu}`,
    });
    temperature = { col: tc, name: layout.names[tc], unit: tu };
  }

  const columns: DetectedColumn[] = layout.names.map((header, index) => {
    const h = heads[index];
    const role = roles[index] ?? 'other';
    const u = index === vc ? unit : index === temperature?.col ? temperature.unit : h.unit;
    const reason = roles[index]
      ? reasons[index]
      : `${reasons[index]}; not used${h.role !== 'other' ? ` (looked like ${h.role})` : ''}`;
    return { index, header, role, unit: u, reason };
  });
  return {
    time,
    tagFilter: long ? { col: long.tagCol, tag: long.tag.tag } : null,
    orderOpen,
    value: { col: vc, name: vName, quantity, unit, factor },
    temperature,
    columns,
    notes,
    warnings,
  };
}

const VALUE_WORDS =
  /^(value|values|val|reading|pv|avg|average|mean|measurement|interpolated value|actual value)$/i;
const NOT_VALUE = /^(quality|status|flag|flags|q|good|confidence)$/i;

/** The value column of a long-format file: named "value" (or the like), or the only numeric column left. */
function longValueColumn(
  layout: Layout,
  kinds: { kind: string }[],
  used: Set<number>,
  fileName: string,
): number {
  const numeric = kinds
    .map((k, i) =>
      k.kind === 'number' && !used.has(i) && !NOT_VALUE.test(layout.names[i].trim()) ? i : -1,
    )
    .filter((i) => i >= 0);
  const named = numeric.find((i) => VALUE_WORDS.test(layout.names[i].trim()));
  if (named !== undefined) return named;
  if (numeric.length === 1) return numeric[0];
  throw new InputError(
    numeric.length
      ? `several numeric columns could hold the tags' values (${numeric.map((i) => `"${layout.names[i]}"`).join(', ')}); name it with --level-column`
      : "found no numeric column for the tags' values; name it with --level-column",
    { file: fileName },
  );
}

/** Two spellings of one unit (m and metres, kPa and kpa): the same factor to SI. */
function sameUnit(a: string, b: string): boolean {
  if (a === b) return true;
  const la = lengthFactorToM(a),
    lb = lengthFactorToM(b);
  if (la !== null && lb !== null) return la === lb;
  const pa = pressureFactorToPa(a),
    pb = pressureFactorToPa(b);
  return pa !== null && pb !== null && pa === pb;
}
