import { InputError } from '../errors.js';
import { newParts, scanDateTime } from './datetime.js';
import { decodeHead, type EncodingGuess } from './decode.js';
import type { DateOrder } from './options.js';
import type { Plan } from './plan.js';
import { forEachRow, type RowSource } from './rows.js';
import type { ReadNote } from './series.js';

/** The first part of a file that is searched for the layout (preamble, header, delimiter). */
export const HEAD_BYTES = 256 * 1024;

/**
 * The file's head as text with LF line ends, cut at the last whole line, and the file's own line
 * end (a lone CR for old-style files). Shared by every reader built on ingest.
 */
export function readTextHead(
  bytes: Uint8Array,
  fileName: string,
  guess: EncodingGuess,
): { head: string; newline: '\n' | '\r' } {
  let head = decodeHead(bytes, guess, HEAD_BYTES, fileName);
  if (head.trim() === '')
    throw new InputError('the file holds no text (only blanks)', { file: fileName });
  const newline = head.indexOf('\n') < 0 && head.indexOf('\r') >= 0 ? '\r' : '\n';
  head = head.replace(/\r\n?/g, '\n');
  if (guess.bomBytes + HEAD_BYTES < bytes.length) head = head.slice(0, head.lastIndexOf('\n') + 1);
  return { head, newline };
}

/** Day-first or month-first, decided from the whole file (a first or second number above 12). */
export function decideDateOrder(rs: RowSource, plan: Plan, notes: ReadNote[]): DateOrder {
  const tp = plan.time;
  const c = tp.kind === 'text' ? tp.col : tp.kind === 'date+clock' ? tp.dateCol : -1;
  const p = newParts();
  let dmy = 0,
    mdy = 0,
    differ = false;
  forEachRow(rs, (r) => {
    if (
      c >= r.count ||
      !scanDateTime(r.src[c], r.start[c], r.end[c], p) ||
      !p.hasDate ||
      p.yearFirst
    )
      return;
    if (p.n1 > 12 && !dmy) dmy = r.line;
    if (p.n2 > 12 && !mdy) mdy = r.line;
    if (p.n1 !== p.n2) differ = true;
  });
  const where = { file: rs.fileName, field: plan.columns[c]?.header };
  if (dmy && mdy)
    throw new InputError(
      `dates are day-first on line ${dmy} and month-first on line ${mdy}; give --date-order`,
      where,
    );
  if (dmy || mdy) {
    notes.push({
      code: 'date-order',
      message: `dates are ${dmy ? `day-first: line ${dmy}` : `month-first: line ${mdy}`} has a ${dmy ? 'first' : 'second'} number above 12`,
    });
    return dmy ? 'dmy' : 'mdy';
  }
  if (!differ) {
    notes.push({
      code: 'date-order',
      message: 'day and month are the same number on every row: the date order does not matter',
    });
    return 'dmy';
  }
  throw new InputError(
    'cannot tell day-first from month-first dates: no day above 12 in the file; give --date-order (dmy or mdy)',
    where,
  );
}
