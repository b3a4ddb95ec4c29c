/**
 * readLevelLog: the bytes of a logger file to a level series in SI units, with an account of
 * every inference. Pure: no file system, no clock; the same bytes and options give the same
 * series.
 */
import { InputError } from '../errors.js';
import { dropRepeats, findGaps, sortByTime } from './clean.js';
import { collect, countLines, type Collected } from './collect.js';
import { detectEncoding, NotUtf8, type EncodingGuess } from './decode.js';
import { findLayout, type Layout } from './layout.js';
import { CLASH_FRACTION, DEFAULT_MAX_BYTES, type ReadOptions } from './options.js';
import { makePlan, type LongPlan, type Plan } from './plan.js';
import { findTagColumns, listTags, pickTag, type TagSummary } from './long-format.js';
import { temperaturesC, toLevelM, type BaroSeries } from './quantity.js';
import type { RowSource } from './rows.js';
import type { LevelSeries, ReadNote } from './series.js';
import { ZoneResolver } from './zone.js';
import { isZip } from './workbook.js';
import { decideDateOrder, readTextHead } from './head.js';
import { countText } from '../format/words.js';

interface Raw {
  layout: Layout;
  plan: Plan;
  col: Collected;
  tags: TagSummary[] | null;
  tempC: Float64Array | null;
  absolute: boolean;
  notes: ReadNote[];
  warnings: ReadNote[];
}

function pass(
  bytes: Uint8Array,
  fileName: string,
  opts: ReadOptions,
  guess: EncodingGuess,
  forBaro: boolean,
): Raw {
  const notes: ReadNote[] = [
    { code: 'encoding', message: `text encoding ${guess.encoding}: ${guess.reason}` },
  ];
  const warnings: ReadNote[] = [];
  const { head, newline } = readTextHead(bytes, fileName, guess);
  const layout = findLayout(head, fileName, opts);
  notes.push(...layout.notes);
  const rs: RowSource = {
    bytes,
    guess,
    fileName,
    delimiter: layout.delimiter,
    newline,
    skipThroughLine: layout.dataAfterLine,
  };
  const long = longFormat(rs, layout, opts, fileName, forBaro, notes);
  const plan = makePlan(layout, opts, fileName, forBaro, long);
  notes.push(...plan.notes);
  warnings.push(...plan.warnings);
  const tp = plan.time;
  if (plan.orderOpen && (tp.kind === 'text' || tp.kind === 'date+clock'))
    tp.order = decideDateOrder(rs, plan, notes);
  const dated = tp.kind === 'text' || tp.kind === 'date+clock';
  const zone = opts.tz !== undefined && dated ? new ZoneResolver(opts.tz, fileName) : null;
  const col = collect(
    rs,
    plan,
    layout.names,
    layout.decimal,
    zone,
    countLines(bytes),
    layout.group,
  );

  if (col.badRows)
    warnings.push({
      code: 'rows-skipped',
      message: `${countText(col.badRows, 'row')} with unreadable cells skipped (line ${col.badLines.join(', ')}${col.badRows > col.badLines.length ? ', …' : ''})`,
    });
  if (col.n === 0) throw new InputError('no readable data rows', { file: fileName });
  if (col.local) {
    if (zone)
      notes.push({
        code: 'time-zone',
        message: `${countText(col.local, 'local time')} without offset read in ${zone.zone} (${opts.tzSource ?? 'as stated'})`,
      });
    else
      notes.push({
        code: 'time-zone',
        message: `${countText(col.local, 'time')} without offset treated as UTC (give --tz for local times)`,
      });
  }
  if (col.withOffset)
    notes.push({
      code: 'time-zone',
      message: `${countText(col.withOffset, 'time')} ${col.withOffset === 1 ? 'carries its' : 'carry their'} UTC offset`,
    });
  if (col.local && col.withOffset)
    warnings.push({ code: 'mixed-offsets', message: 'some times carry an offset and some do not' });
  if (col.repeated)
    warnings.push({
      code: 'dst-repeated',
      message: `${countText(col.repeated, 'time')} in the hour repeated when clocks went back in ${zone!.zone}: resolved by row order`,
    });
  if (col.hourBack && !zone && col.local) {
    throw new InputError(
      `the time steps back by ${(col.hourBack.stepS / 60).toFixed(1)} min here: a clock change (clocks going back an hour) ` +
        'in a log written in local time without offsets; give the zone the logger kept, e.g. --tz Europe/Lisbon (the same `tz` setting in the service)',
      {
        file: fileName,
        line: col.hourBack.line,
        field: plan.columns[tp.kind === 'date+clock' ? tp.clockCol : tp.col]?.header,
      },
    );
  }
  if (col.outOfOrder) {
    sortByTime(col);
    warnings.push({ code: 'rows-sorted', message: 'rows were out of time order: sorted by time' });
  }
  const rep = dropRepeats(col);
  if (rep.copies)
    warnings.push({
      code: 'duplicates-dropped',
      message: `${countText(rep.copies, 'repeated row')} dropped (first on line ${rep.firstLine})`,
    });
  if (rep.conflicts > Math.max(2, CLASH_FRACTION * col.rows)) {
    const hint =
      zone || !dated
        ? "check the time column and the logger's clock"
        : 'a clock change read without the zone is the usual cause: give the zone the logger kept, e.g. --tz Europe/Lisbon';
    throw new InputError(
      `${rep.conflicts} of ${col.rows} rows repeat an earlier time with a different value (first on line ${rep.firstLine}), ` +
        `more than ${CLASH_FRACTION * 100} %: ${hint}`,
      { file: fileName, line: rep.firstLine },
    );
  }
  if (rep.conflicts)
    warnings.push({
      code: 'conflicting-duplicates',
      message: `${countText(rep.conflicts, 'row')} ${rep.conflicts === 1 ? 'repeats' : 'repeat'} an earlier time with a different value: the first kept (first on line ${rep.firstLine})`,
    });
  if (col.n < 2)
    throw new InputError('only one data row: a drain test needs a series of readings', {
      file: fileName,
      line: col.line[0],
    });
  const tempC =
    plan.temperature && col.temp
      ? temperaturesC(
          col.temp,
          col.n,
          plan.temperature.unit,
          col.line,
          fileName,
          plan.temperature.name,
        )
      : null;
  const absolute = dated || (tp.kind === 'number' && tp.absolute);
  return { layout, plan, col, tags: long?.tags ?? null, tempC, absolute, notes, warnings };
}

/** For a long-format file: its tags, and the one this pass reads (level or barometric). */
function longFormat(
  rs: RowSource,
  layout: Layout,
  opts: ReadOptions,
  fileName: string,
  forBaro: boolean,
  notes: ReadNote[],
): LongPlan | null {
  const cols = findTagColumns(layout);
  const wanted = forBaro ? opts.baroTag : opts.levelTag;
  if (!cols) {
    if (wanted !== undefined)
      throw new InputError(
        `--${forBaro ? 'baro' : 'level'}-tag is for files with one row per time and tag; this file has one column per series (name the column with --level-column)`,
        { file: fileName, field: forBaro ? 'baroTag' : 'levelTag' },
      );
    return null;
  }
  const tagHeader = layout.names[cols.tagCol];
  const tags = listTags(rs, cols);
  const tag = pickTag(tags, wanted, fileName, forBaro ? 'barometric' : 'level', tagHeader);
  notes.push({
    code: 'long-format',
    message: `one row per time and tag (tag column "${tagHeader}", ${countText(tags.length, 'tag')}): the ${forBaro ? 'barometric' : 'level'} series is tag "${tag.tag}"${tag.unit ? ` [${tag.unit}]` : ''}, ${tag.rows} rows`,
  });
  return { ...cols, tag, tags };
}

/** The tags of a long-format file (one row per time and tag), or null for an ordinary file. */
export function readLogTags(
  bytes: Uint8Array,
  fileName: string,
  opts: ReadOptions = {},
): TagSummary[] | null {
  const guess = detectEncoding(bytes);
  const { head, newline } = readTextHead(bytes, fileName, guess);
  const layout = findLayout(head, fileName, opts);
  const cols = findTagColumns(layout);
  if (!cols) return null;
  return listTags(
    {
      bytes,
      guess,
      fileName,
      delimiter: layout.delimiter,
      newline,
      skipThroughLine: layout.dataAfterLine,
    },
    cols,
  );
}

function readRaw(bytes: Uint8Array, fileName: string, opts: ReadOptions, forBaro: boolean): Raw {
  if (!(bytes instanceof Uint8Array))
    throw new InputError('expected the file as bytes', { file: fileName });
  const max = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  if (bytes.length > max)
    throw new InputError(`file is ${bytes.length} bytes, more than the ${max} allowed`, {
      file: fileName,
    });
  if (bytes.length === 0) throw new InputError('empty file', { file: fileName });
  if (isZip(bytes)) {
    throw new InputError(
      'a workbook or zip archive, not a text log: efflux fit, efflux inspect and the service read .xlsx workbooks (first sheet, or --sheet NAME); elsewhere export the sheet as CSV',
      { file: fileName },
    );
  }
  const guess = detectEncoding(bytes);
  try {
    return pass(bytes, fileName, opts, guess, forBaro);
  } catch (e) {
    if (!(e instanceof NotUtf8)) throw e;
  }
  const raw = pass(
    bytes,
    fileName,
    opts,
    {
      encoding: 'windows-1252',
      bomBytes: 0,
      reason: 'not valid UTF-8, so read as Latin-1 (Windows-1252)',
    },
    forBaro,
  );
  raw.warnings.push({
    code: 'encoding',
    message: 'not valid UTF-8: read as Latin-1 (Windows-1252); check accented text',
  });
  return raw;
}

function readBaro(
  opts: ReadOptions,
  levelBytes: Uint8Array,
  levelFile: string,
): { series: BaroSeries; raw: Raw } | null {
  // a barometric tag in the level's own long-format file, or a file of its own
  const source =
    opts.baroTag !== undefined ? { bytes: levelBytes, fileName: levelFile } : opts.baro;
  if (!source) return null;
  const { bytes, fileName: baroName } = source;
  const raw = readRaw(
    bytes,
    baroName,
    {
      tz: opts.tz,
      dateOrder: opts.dateOrder,
      baroTag: opts.baroTag,
      delimiter: opts.baroTag !== undefined ? opts.delimiter : undefined,
      decimal: opts.baroTag !== undefined ? opts.decimal : undefined,
    },
    true,
  );
  if (!raw.absolute)
    throw new InputError('the barometric log needs dates and times (not elapsed time)', {
      file: baroName,
    });
  const n = raw.col.n;
  const pa = new Float64Array(n);
  for (let i = 0; i < n; i++) pa[i] = raw.col.value[i] * raw.plan.value.factor;
  return { series: { fileName: baroName, timeMs: raw.col.timeMs.slice(0, n), pa }, raw };
}

// The passes over every sample as small functions: in a fresh process V8 optimises each at once
// instead of running these loops inside readLevelLog in the interpreter.

function firstNonFinite(a: Float64Array, n: number): number {
  for (let i = 0; i < n; i++) if (!Number.isFinite(a[i])) return i;
  return -1;
}

/** Epoch (or log-zero) milliseconds to seconds from t0, in place. */
function secondsFrom(t: Float64Array, t0: number): void {
  for (let i = 0; i < t.length; i++) t[i] = (t[i] - t0) / 1000;
}

function firstNotAscending(t: Float64Array): number {
  for (let i = 1; i < t.length; i++) if (!(t[i] > t[i - 1])) return i;
  return -1;
}

export function readLevelLog(
  bytes: Uint8Array,
  fileName: string,
  options: ReadOptions = {},
): LevelSeries {
  const raw = readRaw(bytes, fileName, options, false);
  const { col, plan, layout } = raw;
  const notes = raw.notes,
    warnings = raw.warnings;
  const baro =
    plan.value.quantity === 'absolute-pressure' ? readBaro(options, bytes, fileName) : null;
  if (baro)
    warnings.push(
      ...baro.raw.warnings.map((w) => ({
        code: `baro-${w.code}`,
        message: `barometric log: ${w.message}`,
      })),
    );
  const { levelM, notes: qNotes } = toLevelM(
    {
      n: col.n,
      timeMs: col.timeMs,
      value: col.value,
      line: col.line,
      tempC: raw.tempC,
      absoluteTime: raw.absolute,
    },
    plan,
    options,
    fileName,
    baro?.series ?? null,
  );
  notes.push(...qNotes);
  const bad = firstNonFinite(levelM, col.n);
  if (bad >= 0)
    throw new InputError('level out of range after conversion', {
      file: fileName,
      line: col.line[bad],
      field: plan.value.name,
    });
  const n = col.n;
  const t0 = col.timeMs[0];
  // In place: the collected buffers become the series (no second copy of a million rows).
  const timeS = col.timeMs.subarray(0, n);
  secondsFrom(timeS, t0);
  // Times far from zero can round to equal seconds: keep the series strictly ascending.
  const tie = firstNotAscending(timeS);
  if (tie >= 0)
    throw new InputError('times too close together to tell apart', {
      file: fileName,
      line: col.line[tie],
    });
  const gaps = findGaps(timeS);
  if (gaps.length) {
    const list = gaps
      .slice(0, 3)
      .map((g) => `${g.startS}–${g.endS} s (line ${col.line[g.after + 1]})`)
      .join(', ');
    warnings.push({
      code: 'gaps',
      message: `${countText(gaps.length, 'gap')} longer than 5 median intervals: ${list}${gaps.length > 3 ? ', …' : ''}`,
    });
  }
  const series: LevelSeries = {
    timeS,
    levelM,
    t0EpochMs: raw.absolute ? t0 : null,
    sourceLine: col.line.subarray(0, n),
    metadata: layout.metadata,
    columns: plan.columns,
    ...(raw.tags ? { tags: raw.tags } : {}),
    notes,
    warnings,
  };
  if (raw.tempC) series.temperatureC = raw.tempC;
  return series;
}
