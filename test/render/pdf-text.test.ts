import { describe, expect, it } from 'vitest';
import { createReportDoc, finishReportDoc, type DocIdentity } from '../../server/render/pdf-doc.js';
import { fields, paragraph, table } from '../../server/render/pdf-layout.js';
import { breakLongRuns, clipLine, LONGEST_RUN } from '../../server/render/pdf-text.js';

const id: DocIdentity = {
  title: 'wrap test',
  subject: 'test',
  kind: 'fit',
  reportId: '0'.repeat(16),
  contentSha256: '0'.repeat(64),
  dateIso: '2026-01-01T00:00:00Z',
  extra: {},
  json: '{}',
};

/** Lays out one unbroken word of n characters three ways; returns how many characters pdfkit measured, and the pages. */
async function measure(n: number) {
  const doc = createReportDoc(id);
  let measured = 0;
  const width = doc.widthOfString.bind(doc);
  (doc as unknown as { widthOfString: typeof width }).widthOfString = (
    s: string,
    o?: PDFKit.Mixins.TextOptions,
  ) => ((measured += s.length), width(s, o));
  const word = 'w'.repeat(n);
  paragraph(doc, word);
  fields(doc, [['notes', word]]);
  table(
    doc,
    [
      { title: 'a', width: 60 },
      { title: 'b', width: 300 },
    ],
    [['x', word]],
  );
  const pages = doc.bufferedPageRange().count;
  const pdf = await finishReportDoc(doc, id);
  return { measured, pages, pdf };
}

describe('breakLongRuns', () => {
  it('leaves ordinary text and a SHA-256 alone', () => {
    const sha = 'a'.repeat(64);
    expect(breakLongRuns(`hash ${sha} ok`)).toBe(`hash ${sha} ok`);
    expect(breakLongRuns('x'.repeat(LONGEST_RUN))).toBe('x'.repeat(LONGEST_RUN));
  });
  it('cuts a long run into lines of LONGEST_RUN characters, nothing lost', () => {
    const run = 'ab'.repeat(500);
    const out = breakLongRuns(`start ${run} end`);
    const lines = out.split('\n');
    expect(lines).toHaveLength(Math.ceil(run.length / LONGEST_RUN)); // 1000 characters → 12 full lines and one of 40
    expect(out.replace(/\n/g, '')).toBe(`start ${run} end`);
    for (const l of lines.slice(1, -1)) expect(l.length).toBe(LONGEST_RUN);
  });
  it('keeps characters outside the BMP whole', () => {
    const run = '😀'.repeat(200); // 400 UTF-16 code units
    const lines = breakLongRuns(run).split('\n');
    expect(lines.map((l) => Array.from(l).length)).toEqual([80, 80, 40]);
    expect(lines.join('')).toBe(run);
  });
  it('clips a header line with an ellipsis', () => {
    expect(clipLine('a\nb', 10)).toBe('a b');
    expect(Array.from(clipLine('z'.repeat(500), 110))).toHaveLength(110);
    expect(clipLine('z'.repeat(500), 110).endsWith('…')).toBe(true);
  });
});

describe('PDF text wrapping is linear in the text length', () => {
  it('measures a bounded number of characters per character of an unbroken word', async () => {
    const small = await measure(10_000);
    const large = await measure(100_000);
    // pdfkit's own wrapper re-measured the rest of the word once per line: about n²/(2·line) chars,
    // ~5·10⁷ for 100 000 characters. Bounded runs: a few measurements per character.
    expect(large.measured).toBeLessThan(10 * 3 * 100_000);
    // ten times the text, about ten times the work (not a hundred)
    expect(large.measured / small.measured).toBeGreaterThan(8);
    expect(large.measured / small.measured).toBeLessThan(12);
    // and the whole word is laid out: a 100 000-character word in three places fills many pages
    expect(large.pages).toBeGreaterThan(small.pages);
    expect(large.pdf.subarray(0, 5).toString()).toBe('%PDF-');
  });
});
