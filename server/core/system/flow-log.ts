import { InputError } from '../errors.js';
import { dropRepeats, sortByTime } from '../ingest/clean.js';
import { collect, countLines } from '../ingest/collect.js';
import { detectEncoding, NotUtf8, type EncodingGuess } from '../ingest/decode.js';
import { decideDateOrder, readTextHead } from '../ingest/head.js';
import { readHeader } from '../ingest/header.js';
import { findLayout } from '../ingest/layout.js';
import { DEFAULT_MAX_BYTES, type DateOrder } from '../ingest/options.js';
import { makePlan } from '../ingest/plan.js';
import type { RowSource } from '../ingest/rows.js';
import { ZoneResolver } from '../ingest/zone.js';
import { flowFactorToM3s } from '../units/index.js';
import { countText } from '../format/words.js';

/**
 * A logged inflow (a flow meter's or a pump's record: time and flow) in SI units. The level-log
 * reader (core/ingest) knows only length and pressure columns, so this reads the flow column
 * itself but takes everything else from ingest: encoding, delimiter and decimal detection,
 * preamble and header, the time column in all its forms (dates, day/month order, zones, epoch,
 * elapsed), sorting and repeated rows. Pure: bytes in, series out.
 */
export interface FlowLogOptions {
  /** Unit of the flow column when its header gives none (e.g. "L/s", "m3/h", "gpm"). */
  unit?: string;
  /** Column holding the flow: header text or 1-based index. */
  flowColumn?: string | number;
  timeColumn?: string | number;
  dateOrder?: DateOrder;
  tz?: string;
  delimiter?: string;
  decimal?: '.' | ',';
  maxBytes?: number;
}

export interface FlowSeries {
  fileName: string;
  /** Seconds from the first sample, strictly ascending. */
  timeS: Float64Array;
  flowM3S: Float64Array;
  /** Epoch ms of the first sample, or null for an elapsed-time log. */
  t0EpochMs: number | null;
  unit: string;
  column: string;
  warnings: string[];
}

const FLOW_WORDS = ['flow', 'inflow', 'q', 'rate', 'pump', 'discharge', 'feed'];

/** A flow unit in the header: in brackets (as ingest reads it) or as the last word. */
function headerFlowUnit(header: string): string | null {
  const u = readHeader(header).unit;
  if (u && flowFactorToM3s(u) !== null) return u;
  const parts = header.trim().split(/[\s_]+/);
  const last = parts[parts.length - 1];
  return parts.length > 1 && flowFactorToM3s(last) !== null ? last : null;
}

function pickFlowColumn(names: string[], opts: FlowLogOptions, fileName: string): number {
  if (opts.flowColumn !== undefined) {
    const sel = opts.flowColumn;
    const i =
      typeof sel === 'number' || /^\d+$/.test(sel)
        ? Number(sel) - 1
        : names.findIndex((n) => n.toLowerCase() === sel.trim().toLowerCase());
    if (!(i >= 0 && i < names.length))
      throw new InputError(
        `no column ${JSON.stringify(sel)} (columns: ${names.map((n) => `"${n}"`).join(', ')})`,
        { file: fileName, field: 'flowColumn' },
      );
    return i;
  }
  let i = names.findIndex((n) => headerFlowUnit(n) !== null);
  if (i < 0)
    i = names.findIndex((n) =>
      n
        .toLowerCase()
        .split(/[^a-z0-9]+/)
        .some((w) => FLOW_WORDS.includes(w)),
    );
  if (i < 0)
    throw new InputError(
      `found no flow column (a header with a flow unit such as "inflow [L/s]", or the word "flow"); columns: ${names.map((n) => `"${n}"`).join(', ')}`,
      { file: fileName },
    );
  return i;
}

function readWith(
  bytes: Uint8Array,
  fileName: string,
  opts: FlowLogOptions,
  guess: EncodingGuess,
): FlowSeries {
  const { head, newline } = readTextHead(bytes, fileName, guess);
  const layout = findLayout(head, fileName, opts);
  const fc = pickFlowColumn(layout.names, opts, fileName);
  const column = layout.names[fc] ?? `column ${fc + 1}`;
  const unit = headerFlowUnit(column) ?? opts.unit;
  if (!unit)
    throw new InputError(`column "${column}" gives no flow unit; give one (e.g. L/s, m3/h, gpm)`, {
      file: fileName,
      field: column,
    });
  const factor = flowFactorToM3s(unit);
  if (factor === null)
    throw new InputError(`"${unit}" is not a flow unit we know (e.g. L/s, L/min, m3/h, gpm)`, {
      file: fileName,
      field: column,
    });
  // ingest's planner finds the time column; the flow column goes in as its "measured" column with
  // a placeholder length unit, whose factor is not used (the flow factor above is)
  const plan = makePlan(
    layout,
    {
      timeColumn: opts.timeColumn,
      levelColumn: fc + 1,
      unit: 'm',
      dateOrder: opts.dateOrder,
      quantity: 'level',
    },
    fileName,
  );
  const rs: RowSource = {
    bytes,
    guess,
    fileName,
    delimiter: layout.delimiter,
    newline,
    skipThroughLine: layout.dataAfterLine,
  };
  const tp = plan.time;
  if (plan.orderOpen && (tp.kind === 'text' || tp.kind === 'date+clock'))
    tp.order = decideDateOrder(rs, plan, []);
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
  const warnings: string[] = [];
  if (col.badRows)
    warnings.push(
      `${countText(col.badRows, 'row')} with unreadable cells skipped (line ${col.badLines.join(', ')})`,
    );
  if (col.outOfOrder) {
    sortByTime(col);
    warnings.push('rows were out of time order: sorted by time');
  }
  const rep = dropRepeats(col);
  if (rep.copies + rep.conflicts)
    warnings.push(
      `${countText(rep.copies + rep.conflicts, 'row')} repeating an earlier time dropped (first on line ${rep.firstLine})`,
    );
  const n = col.n;
  if (n < 2) throw new InputError('an inflow log needs at least two readings', { file: fileName });
  const t0 = col.timeMs[0];
  const timeS = new Float64Array(n);
  const flowM3S = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    timeS[i] = (col.timeMs[i] - t0) / 1000;
    flowM3S[i] = col.value[i] * factor;
    if (i > 0 && !(timeS[i] > timeS[i - 1]))
      throw new InputError('times too close together to tell apart', {
        file: fileName,
        line: col.line[i],
      });
    if (!(flowM3S[i] >= 0))
      throw new InputError(`a known inflow cannot be negative (${col.value[i]} ${unit})`, {
        file: fileName,
        line: col.line[i],
        field: column,
      });
  }
  const absolute = dated || (tp.kind === 'number' && tp.absolute);
  return { fileName, timeS, flowM3S, t0EpochMs: absolute ? t0 : null, unit, column, warnings };
}

export function readFlowLog(
  bytes: Uint8Array,
  fileName: string,
  options: FlowLogOptions = {},
): FlowSeries {
  if (!(bytes instanceof Uint8Array))
    throw new InputError('expected the file as bytes', { file: fileName });
  const max = options.maxBytes ?? DEFAULT_MAX_BYTES;
  if (bytes.length > max)
    throw new InputError(`file is ${bytes.length} bytes, more than the ${max} allowed`, {
      file: fileName,
    });
  if (bytes.length === 0) throw new InputError('empty file', { file: fileName });
  const guess = detectEncoding(bytes);
  try {
    return readWith(bytes, fileName, options, guess);
  } catch (e) {
    if (!(e instanceof NotUtf8)) throw e;
  }
  const s = readWith(bytes, fileName, options, {
    encoding: 'windows-1252',
    bomBytes: 0,
    reason: 'not valid UTF-8',
  });
  s.warnings.push('not valid UTF-8: read as Latin-1 (Windows-1252)');
  return s;
}
