/**
 * The data rows of a whole file, one at a time, without an object per row: fields are given
 * as [start, end) offsets into a shared string. Lines without quotes (nearly every logger
 * line) are split by indexOf on the delimiter; a piece of text that holds quotes goes through
 * papaparse with the delimiter we found, so quoted fields keep their commas and newlines.
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
  const row: Row = { line: 0, count: 0, src: new Array<string>(MAX_FIELDS).fill(''), start: new Int32Array(MAX_FIELDS), end: new Int32Array(MAX_FIELDS) };
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
    if (cut <= 0) { carry = text; continue; }
    line = quoted ? quotedPiece(text, cut, line, rs, row, onRow) : plainPiece(text, cut, line, rs, delim, row, onRow);
    carry = cut < text.length ? text.slice(cut) : '';
  }
  if (carry.length) {
    const text = carry;
    if (text.indexOf('"') >= 0) quotedPiece(text, text.length, line, rs, row, onRow);
    else plainPiece(text, text.length, line, rs, delim, row, onRow);
  }
}

/** The last line end before `cut` that is outside quotes. */
function evenQuoteCut(text: string, cut: number, nl: string): number {
  let inside = false, best = 0;
  const q = 34, n = nl.charCodeAt(0);
  for (let i = 0; i < cut; i++) {
    const c = text.charCodeAt(i);
    if (c === q) inside = !inside;
    else if (c === n && !inside) best = i + 1;
  }
  return best;
}

function plainPiece(text: string, cut: number, line: number, rs: RowSource, delim: string, row: Row,
  onRow: (row: Row) => void): number {
  const nl = rs.newline;
  let p = 0;
  while (p < cut) {
    let e = text.indexOf(nl, p);
    if (e < 0 || e >= cut) e = cut;
    const next = e + 1;
    if (e > p && text.charCodeAt(e - 1) === 13) e--;
    if (line > rs.skipThroughLine && e > p) {
      let count = 0, s = p;
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
      row.line = line;
      if (!(count === 1 && text.slice(p, e).trim() === '')) onRow(row);
    }
    line++;
    p = next;
  }
  return line;
}

function quotedPiece(text: string, cut: number, line: number, rs: RowSource, row: Row,
  onRow: (row: Row) => void): number {
  const piece = text.slice(0, cut);
  const crlf = rs.newline === '\n' && piece.indexOf('\r\n') >= 0;
  const res = Papa.parse<string[]>(piece, { delimiter: rs.delimiter, newline: crlf ? '\r\n' : rs.newline, quoteChar: '"', skipEmptyLines: false });
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
