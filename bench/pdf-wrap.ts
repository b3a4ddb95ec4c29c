/**
 * Wrapping of long unbroken text in the PDF renderer: `npx tsx bench/pdf-wrap.ts [n …]`. Lays out
 * one paragraph of n characters with no break opportunity (the worst case a free-text field can
 * send) in a report document, and prints the time and the characters pdfkit measured.
 */
import { createReportDoc, finishReportDoc, type DocIdentity } from '../server/render/pdf-doc.js';
import { fields, paragraph } from '../server/render/pdf-layout.js';

const sizes = process.argv
  .slice(2)
  .map(Number)
  .filter((n) => n > 0);
const id: DocIdentity = {
  title: 'wrap bench',
  subject: 'bench',
  kind: 'fit',
  reportId: '0'.repeat(16),
  contentSha256: '0'.repeat(64),
  dateIso: '2026-01-01T00:00:00Z',
  extra: {},
  json: '{}',
};

async function once(n: number) {
  const doc = createReportDoc(id);
  let measured = 0;
  const width = doc.widthOfString.bind(doc);
  (doc as unknown as { widthOfString: typeof width }).widthOfString = (
    s: string,
    o?: PDFKit.Mixins.TextOptions,
  ) => ((measured += s.length), width(s, o));
  const t0 = performance.now();
  paragraph(doc, 'x'.repeat(n));
  fields(doc, [['notes', 'y'.repeat(n)]]);
  const laidOut = performance.now() - t0;
  const pages = doc.bufferedPageRange().count;
  const pdf = await finishReportDoc(doc, id);
  return {
    n,
    laidOutMs: laidOut,
    totalMs: performance.now() - t0,
    measuredChars: measured,
    pages,
    bytes: pdf.length,
  };
}

await once(1000); // warm-up: fonts, JIT
for (const n of sizes.length ? sizes : [1_000, 10_000, 100_000]) {
  const r = await once(n);
  console.log(
    `${String(r.n).padStart(7)} chars ×2: layout ${r.laidOutMs.toFixed(0)} ms, with the file ${r.totalMs.toFixed(0)} ms; pdfkit measured ${r.measuredChars} chars (${(r.measuredChars / (2 * r.n)).toFixed(1)} per char); ${r.pages} pages, ${r.bytes} bytes`,
  );
}
