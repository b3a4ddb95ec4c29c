/**
 * The shape of a log from its first lines: delimiter, decimal mark, the metadata preamble, the
 * header row and the first data rows. Only the head of the file is looked at here.
 */
import Papa from 'papaparse';
import { InputError } from '../errors.js';
import { scanBasicIso } from './basic-time.js';
import { newParts, scanDateTime } from './datetime.js';
import { GROUPED, numberFormat } from './number-format.js';
import { parseNumber, DECIMAL_COMMA, DECIMAL_DOT } from './numbers.js';
import type { LevelSeries, ReadNote } from './series.js';
import { countText } from '../format/words.js';

export interface HeadRow {
  line: number;
  fields: string[];
}

export interface Layout {
  delimiter: string;
  decimal: '.' | ',';
  /** Thousands separator in numbers ("2,099.9", "2.099,9", "2 099,9"), or '' for none. */
  group: string;
  /** 1-based line of the header, or null for a file without one. */
  headerLine: number | null;
  names: string[];
  fieldCount: number;
  /** Line after which data start (the header line, or the line before the first data row). */
  dataAfterLine: number;
  metadata: LevelSeries['metadata'];
  sample: HeadRow[];
  notes: ReadNote[];
}

const CANDIDATES: [string, string][] = [
  ['\t', 'tab'],
  [';', 'semicolon'],
  ['|', 'pipe'],
  [',', 'comma'],
];
const SAMPLE_ROWS = 200;

function parseRows(head: string, delimiter: string): HeadRow[] {
  // Without a quote anywhere, CSV fields are the text between delimiters: split directly (what
  // papaparse itself does then), one line a row, instead of running its parser four times.
  if (head.indexOf('"') < 0) return splitRows(head, delimiter);
  const res = Papa.parse<string[]>(head, {
    delimiter,
    newline: '\n',
    quoteChar: '"',
    skipEmptyLines: false,
  });
  const rows: HeadRow[] = [];
  let line = 1;
  for (const fields of res.data) {
    rows.push({ line, fields });
    line += 1;
    for (const f of fields)
      for (let i = f.indexOf('\n'); i >= 0; i = f.indexOf('\n', i + 1)) line++;
  }
  return rows.filter((r) => r.fields.some((f) => f.trim() !== ''));
}

function splitRows(head: string, delimiter: string): HeadRow[] {
  const lines = head.split('\n');
  const rows: HeadRow[] = [];
  for (let i = 0; i < lines.length; i++) {
    const fields = lines[i].split(delimiter);
    if (fields.some((f) => f.trim() !== '')) rows.push({ line: i + 1, fields });
  }
  return rows;
}

const parts = newParts();

/** A cell that reads as data: a number in either decimal style, or a date/time. */
export function isDataCell(f: string): boolean {
  return (
    !Number.isNaN(parseNumber(f, 0, f.length, DECIMAL_DOT)) ||
    !Number.isNaN(parseNumber(f, 0, f.length, DECIMAL_COMMA)) ||
    GROUPED.test(f) ||
    scanDateTime(f, 0, f.length, parts) ||
    scanBasicIso(f, 0, f.length, parts)
  );
}

function dataLike(fields: string[]): boolean {
  let filled = 0,
    data = 0;
  for (const f of fields) {
    if (f.trim() === '') continue;
    filled++;
    if (isDataCell(f)) data++;
  }
  return filled > 0 && data * 2 >= filled;
}

function headerLike(fields: string[], n: number): boolean {
  if (fields.length !== n) return false;
  let filled = 0,
    data = 0;
  for (const f of fields) {
    if (f.trim() === '') continue;
    filled++;
    if (isDataCell(f)) data++;
  }
  return filled > 0 && data * 2 < filled;
}

function mode(values: number[]): number {
  const counts = new Map<number, number>();
  let best = 0,
    bestN = 0;
  for (const v of values) {
    const n = (counts.get(v) ?? 0) + 1;
    counts.set(v, n);
    if (n > bestN || (n === bestN && v > best)) {
      best = v;
      bestN = n;
    }
  }
  return best;
}

interface Scored {
  delimiter: string;
  label: string;
  rows: HeadRow[];
  count: number;
  score: number;
}

function score(head: string, delimiter: string, label: string): Scored {
  const rows = parseRows(head, delimiter);
  const tail = rows.slice(Math.floor(rows.length / 2));
  const count = mode(tail.map((r) => r.fields.length));
  if (count < 2) return { delimiter, label, rows, count, score: -1 };
  // Lines from the end that keep the same field count: data rows and (usually) the header.
  let run = 0;
  for (let i = rows.length - 1; i >= 0 && rows[i].fields.length === count; i--) run++;
  let cells = 0,
    data = 0;
  for (const r of tail.slice(0, 50))
    for (const f of r.fields) {
      cells++;
      if (isDataCell(f)) data++;
    }
  return { delimiter, label, rows, count, score: run + (cells ? data / cells : 0) };
}

function metaEntry(line: number, text: string, fields: string[]): LevelSeries['metadata'][number] {
  const clean = text.replace(/^[\s#;"']+|[\s"']+$/g, '');
  const kv = /^([^:=]{1,60}?)\s*[:=]\s*(.*)$/.exec(clean);
  const filled = fields.map((f) => f.trim()).filter(Boolean);
  if (kv && kv[1].trim()) return { line, text, key: kv[1].trim(), value: kv[2].trim() };
  if (filled.length === 2)
    return { line, text, key: filled[0].replace(/^#\s*/, ''), value: filled[1] };
  return { line, text };
}

export function findLayout(
  head: string,
  fileName: string,
  opts: { delimiter?: string; decimal?: '.' | ',' },
): Layout {
  const notes: ReadNote[] = [];
  let chosen: Scored;
  if (opts.delimiter !== undefined) {
    const d = opts.delimiter === 'tab' || opts.delimiter === '\\t' ? '\t' : opts.delimiter;
    if (d.length !== 1 || d === '"' || d === '\n' || d === '\r')
      throw new InputError(`delimiter must be one character (or "tab"), got "${opts.delimiter}"`, {
        file: fileName,
        field: 'delimiter',
      });
    chosen = score(head, d, JSON.stringify(d));
    notes.push({ code: 'delimiter', message: `fields split on ${chosen.label}, as given` });
  } else {
    // A delimiter absent from the head gives one field a line, which never scores: not split.
    const scored = CANDIDATES.map(([d, l]) =>
      head.indexOf(d) < 0
        ? { delimiter: d, label: l, rows: [], count: 1, score: -1 }
        : score(head, d, l),
    );
    chosen = scored.reduce((a, b) => (b.score > a.score ? b : a));
    if (chosen.score < 0) {
      throw new InputError(
        'found no delimiter (comma, semicolon, tab or pipe) that splits the lines into columns; give --delimiter',
        { file: fileName },
      );
    }
    notes.push({
      code: 'delimiter',
      message: `fields split on ${chosen.label}: it gives ${chosen.count} fields on the most lines`,
    });
  }
  const rows = chosen.rows;
  const n = chosen.count;
  const isData = (i: number) =>
    i < rows.length && rows[i].fields.length >= n && dataLike(rows[i].fields);
  // Data start where three rows in a row read as data; prefer the first such run that
  // follows a header-like row, so "key;number" metadata lines are not taken for data.
  let first = -1;
  for (let i = 0; i < rows.length; i++) {
    const need = Math.min(3, rows.length - i);
    let ok = true;
    for (let k = 0; k < need && ok; k++) ok = isData(i + k);
    if (!ok) continue;
    if (first < 0) first = i;
    if (i > 0 && headerLike(rows[i - 1].fields, n)) {
      first = i;
      break;
    }
  }
  const lastLine = rows.length ? rows[rows.length - 1].line : 0;
  if (first < 0) {
    const h = rows.findIndex((r) => headerLike(r.fields, n));
    if (h >= 0 && h === rows.length - 1)
      throw new InputError('the file has a header but no data rows', {
        file: fileName,
        line: rows[h].line,
      });
    throw new InputError('found no rows of numbers or times to read', {
      file: fileName,
      ...(lastLine ? { line: lastLine } : {}),
    });
  }
  const prev = first > 0 ? rows[first - 1] : null;
  const hasHeader = prev !== null && headerLike(prev.fields, n);
  const headerIdx = hasHeader ? first - 1 : first;
  const lines = head.split('\n');
  const metadata: Layout['metadata'] = [];
  for (const r of rows.slice(0, headerIdx))
    metadata.push(
      metaEntry(r.line, lines[r.line - 1] ?? r.fields.join(chosen.delimiter), r.fields),
    );
  const names = hasHeader
    ? prev!.fields.map((f) => f.replace(/^\uFEFF/, '').trim())
    : Array.from({ length: n }, (_, i) => `column ${i + 1}`);
  if (hasHeader)
    notes.push({
      code: 'header',
      message: `header on line ${prev!.line}${metadata.length ? `, after ${countText(metadata.length, 'line')} of metadata` : ''}`,
    });
  else notes.push({ code: 'header', message: 'no header row: columns are named by position' });
  const sample = rows.slice(first, first + SAMPLE_ROWS);

  const { decimal, group } = numberFormat(
    sample.flatMap((r) => r.fields),
    chosen.delimiter,
    opts.decimal,
    fileName,
    notes,
  );
  return {
    delimiter: chosen.delimiter,
    decimal,
    group,
    headerLine: hasHeader ? prev!.line : null,
    names,
    fieldCount: n,
    dataAfterLine: hasHeader ? prev!.line : rows[first].line - 1,
    metadata,
    sample,
    notes,
  };
}
