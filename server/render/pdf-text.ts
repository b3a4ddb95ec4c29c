/**
 * Text as pdfkit is given it. pdfkit's line wrapper measures the whole rest of a word that does
 * not fit on a line, once per line it breaks off: a run of n characters with no break opportunity
 * costs O(n²) glyph layouts (a 10 000-character word took ~21 s; see bench/pdf-wrap.ts). Runs
 * longer than LONGEST_RUN are cut into lines of LONGEST_RUN characters here, before pdfkit sees
 * them, so each line's measuring is bounded and wrapping is linear in the text's length. A newline
 * rather than a zero-width space: the monospace font has no glyph for U+200B.
 */

/** Longer than a SHA-256 in hex (64) and than any honest word; shorter than a line at 6.5 pt. */
export const LONGEST_RUN = 80;

const LONG_RUN = new RegExp(`\\S{${LONGEST_RUN + 1},}`, 'gu');

/** The text with every unbroken run of more than LONGEST_RUN characters cut into lines (code points kept whole). */
export function breakLongRuns(text: string): string {
  if (text.length <= LONGEST_RUN) return text;
  return text.replace(LONG_RUN, (run) => {
    const chars = Array.from(run);
    const lines: string[] = [];
    for (let i = 0; i < chars.length; i += LONGEST_RUN)
      lines.push(chars.slice(i, i + LONGEST_RUN).join(''));
    return lines.join('\n');
  });
}

/** A one-line text (page header) cut to `max` characters with an ellipsis: pdfkit's own ellipsis is quadratic too. */
export function clipLine(text: string, max: number): string {
  const chars = Array.from(text.replace(/\s+/g, ' '));
  return chars.length <= max ? chars.join('') : `${chars.slice(0, max - 1).join('')}…`;
}

type Wrapping = { text: (...a: any[]) => any; heightOfString: (...a: any[]) => number };

/** Routes every string a document lays out (text, heightOfString) through breakLongRuns. */
export function withBoundedWrapping<D extends Wrapping>(doc: D): D {
  const text = doc.text.bind(doc);
  const heightOfString = doc.heightOfString.bind(doc);
  doc.text = (s: unknown, ...rest: unknown[]) =>
    text(typeof s === 'string' ? breakLongRuns(s) : s, ...rest);
  doc.heightOfString = (s: unknown, ...rest: unknown[]) =>
    heightOfString(typeof s === 'string' ? breakLongRuns(s) : s, ...rest);
  return doc;
}
