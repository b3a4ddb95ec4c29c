/**
 * Hand-written fast path: papaparse builds an object per row, too slow for 10⁶-row logs; it still reads every hard line.
 *
 * The data rows of a whole file, one at a time, without an object per row: fields are given
 * as [start, end) offsets into a shared string. Lines are split by indexOf on the delimiter,
 * simple quoted fields included; from the first line with doubled quotes or a line break inside
 * quotes, the rest of the piece goes through papaparse with the delimiter we found.
 */
import Papa from 'papaparse';
import { textChunks, type EncodingGuess } from './decode.js';

export interface Row {
  /** 1-based line number where the row starts. */
  line: number;
  count: number;
  /** The string holding field i (the whole piece of text on the fast path). */
  src: string[];
  start: Int32Array;
  end: Int32Array;
}

const MAX_FIELDS = 256;

export interface RowSource {
  bytes: Uint8Array;
  guess: EncodingGuess;
  fileName: string;
  delimiter: string;
  /** Line terminator: "\n" (also for CRLF) or "\r" for old classic-Mac files. */
  newline: '\n' | '\r';
  /** Rows on lines up to this one are skipped (preamble and header). */
  skipThroughLine: number;
}

/** Calls onRow for every non-blank row after the header. */
export function forEachRow(rs: RowSource, onRow: (row: Row) => void): void {
  const row: Row = {
    line: 0,
    count: 0,
    src: new Array<string>(MAX_FIELDS).fill(''),
    start: new Int32Array(MAX_FIELDS),
    end: new Int32Array(MAX_FIELDS),
  };
  const nl = rs.newline;
  const delim = rs.delimiter;
  let line = 1; // line number of the first line of `carry`
  let carry = '';
  // Only for naming the line of a binary byte: lines in the carried text, then in the chunk.
  const lineAt = (offset: number, chunk: string): number => {
    let n = line;
    for (let i = carry.indexOf(nl); i >= 0; i = carry.indexOf(nl, i + 1)) n++;
    for (let i = chunk.indexOf(nl); i >= 0 && i < offset; i = chunk.indexOf(nl, i + 1)) n++;
    return n;
  };
  const chunks = textChunks(rs.bytes, rs.guess, rs.fileName, 1 << 20, lineAt);
  let r = chunks.next();
  while (!r.done) {
    const chunk = r.value;
    r = chunks.next();
    const text = carry + chunk;
    const last = r.done === true;
    let cut = last ? text.length : text.lastIndexOf(nl) + 1;
    const quoted = text.indexOf('"') >= 0 && text.indexOf('"') < cut;
    if (quoted && !last) cut = evenQuoteCut(text, cut, nl);
    if (cut <= 0) {
      carry = text;
      continue;
    }
    line = splitPiece(text, cut, line, rs, delim, row, onRow);
    carry = cut < text.length ? text.slice(cut) : '';
  }
  if (carry.length) splitPiece(carry, carry.length, line, rs, delim, row, onRow);
}

function splitPiece(
  text: string,
  cut: number,
  line: number,
  rs: RowSource,
  delim: string,
  row: Row,
  onRow: (row: Row) => void,
): number {
  const done = plainPiece(text, cut, line, rs, delim, row, onRow);
  if (done.stop >= cut) return done.line;
  return quotedPiece(text.slice(done.stop, cut), done.line, rs, row, onRow);
}

/** The last line end before `cut` (itself just after a line end) that is outside quotes. */
function evenQuoteCut(text: string, cut: number, nl: string): number {
  const quotesIn = (from: number, to: number): number => {
    let q = 0;
    for (let i = text.indexOf('"', from); i >= 0 && i < to; i = text.indexOf('"', i + 1)) q++;
    return q;
  };
  let end = cut - 1; // a line end
  let q = quotesIn(0, end);
  while (end >= 0 && q % 2 === 1) {
    const prev = text.lastIndexOf(nl, end - 1);
    q -= quotesIn(prev + 1, end);
    end = prev;
  }
  return end + 1;
}

/**
 * Splits the lines of text[0, cut). Quoted fields without doubled quotes or line breaks inside
 * are split here too (offsets inside the quotes); at the first line that needs more, returns
 * its offset so the rest of the piece goes to papaparse.
 */
function plainPiece(
  text: string,
  cut: number,
  line: number,
  rs: RowSource,
  delim: string,
  row: Row,
  onRow: (row: Row) => void,
): { line: number; stop: number } {
  const nl = rs.newline;
  let p = 0;
  let nextQuote = text.indexOf('"');
  if (nextQuote < 0) nextQuote = Infinity;
  while (p < cut) {
    let e = text.indexOf(nl, p);
    if (e < 0 || e >= cut) e = cut;
    const next = e + 1;
    if (e > p && text.charCodeAt(e - 1) === 13) e--;
    if (nextQuote < p) {
      nextQuote = text.indexOf('"', p);
      if (nextQuote < 0) nextQuote = Infinity;
    }
    if (line > rs.skipThroughLine && e > p) {
      if (nextQuote < e) {
        if (!splitQuoted(text, p, e, delim, row)) return { line, stop: p };
      } else splitFields(text, p, e, delim, row);
      row.line = line;
      if (!blankRow(row)) onRow(row); // stops at the first non-blank character
    }
    line++;
    p = next;
  }
  return { line, stop: cut };
}

/**
 * The fields of the unquoted line text[p, e) into row. Once per line, a small function of its
 * own: V8 optimises it after a few hundred lines, long before the loop over the piece would be.
 */
function splitFields(text: string, p: number, e: number, delim: string, row: Row): void {
  let count = 0,
    s = p;
  for (;;) {
    let d = text.indexOf(delim, s);
    if (d < 0 || d > e) d = e;
    if (count < MAX_FIELDS) {
      row.src[count] = text;
      row.start[count] = s;
      row.end[count] = d;
    }
    count++;
    if (d >= e) break;
    s = d + 1;
  }
  row.count = Math.min(count, MAX_FIELDS);
}

/** Only empty or blank fields: a blank line, or the ",,," rows spreadsheets pad with. */
function blankRow(row: Row): boolean {
  for (let i = 0; i < row.count; i++) {
    const src = row.src[i];
    for (let k = row.start[i]; k < row.end[i]; k++) {
      const c = src.charCodeAt(k);
      if (c !== 32 && c !== 9) return false;
    }
  }
  return true;
}

/** Simple quoted fields on one line; false when the line needs a full CSV parser. */
function splitQuoted(text: string, p: number, e: number, delim: string, row: Row): boolean {
  const dc = delim.charCodeAt(0);
  let count = 0,
    s = p;
  for (;;) {
    let a: number, b: number, after: number;
    if (s < e && text.charCodeAt(s) === 34) {
      const q = text.indexOf('"', s + 1);
      if (q < 0 || q >= e || (q + 1 < e && text.charCodeAt(q + 1) === 34)) return false;
      if (q + 1 < e && text.charCodeAt(q + 1) !== dc) return false;
      a = s + 1;
      b = q;
      after = q + 1;
    } else {
      let d = text.indexOf(delim, s);
      if (d < 0 || d > e) d = e;
      const q = text.indexOf('"', s);
      if (q >= 0 && q < d) return false;
      a = s;
      b = d;
      after = d;
    }
    if (count < MAX_FIELDS) {
      row.src[count] = text;
      row.start[count] = a;
      row.end[count] = b;
    }
    count++;
    if (after >= e) break;
    s = after + 1;
  }
  row.count = Math.min(count, MAX_FIELDS);
  return true;
}

function quotedPiece(
  piece: string,
  line: number,
  rs: RowSource,
  row: Row,
  onRow: (row: Row) => void,
): number {
  const crlf = rs.newline === '\n' && piece.indexOf('\r\n') >= 0;
  const res = Papa.parse<string[]>(piece, {
    delimiter: rs.delimiter,
    newline: crlf ? '\r\n' : rs.newline,
    quoteChar: '"',
    skipEmptyLines: false,
  });
  const data = res.data;
  // A piece that ends with a line break yields one empty row after it: not a line.
  const rows = data.length && piece.endsWith(rs.newline) ? data.length - 1 : data.length;
  for (let k = 0; k < rows; k++) {
    const fields = data[k];
    let extra = 0;
    let blank = true;
    const n = Math.min(fields.length, MAX_FIELDS);
    for (let i = 0; i < n; i++) {
      const f = fields[i];
      row.src[i] = f;
      row.start[i] = 0;
      row.end[i] = f.length;
      if (blank && f.trim() !== '') blank = false;
      for (let j = f.indexOf(rs.newline); j >= 0; j = f.indexOf(rs.newline, j + 1)) extra++;
    }
    row.count = n;
    row.line = line;
    if (line > rs.skipThroughLine && !blank) onRow(row);
    line += 1 + extra;
  }
  return line;
}
