/**
 * A report document with pdfkit: embedded DejaVu fonts (σ, ², ±, ≤, ·), A4, a header with the
 * report id and a footer with the content hash and page numbers on every page. Deterministic:
 * CreationDate and ModDate come from the report's own date (pdfkit derives the file ID from the
 * info dictionary), fonts are subset by glyph order, and nothing reads the clock.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import PDFDocument from 'pdfkit';
import { clipLine, withBoundedWrapping } from './pdf-text.js';

const require = createRequire(import.meta.url);
const FONT_DIR = join(dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf');
export const FONTS = {
  regular: join(FONT_DIR, 'DejaVuSans.ttf'),
  bold: join(FONT_DIR, 'DejaVuSans-Bold.ttf'),
  mono: join(FONT_DIR, 'DejaVuSansMono.ttf'),
};

export type Doc = PDFKit.PDFDocument;

export interface DocIdentity {
  title: string;
  subject: string;
  kind: 'fit' | 'outlet' | 'joint-fit';
  reportId: string;
  contentSha256: string;
  /** ISO time: the document's CreationDate and ModDate. */
  dateIso: string;
  /** Extra Info entries (ASCII) that `report verify` reads back. */
  extra: Record<string, string>;
  /** The canonical JSON report, embedded as an attachment so a PDF can be compared field by field. */
  json: string;
  /**
   * A status the reader must not miss (DRAFT, REJECTED, SUPERSEDED), printed in the header and
   * across every page; with a line saying what it means. Absent for a report in force.
   */
  mark?: { word: string; meaning: string };
}

export const MARGIN = 50;

export function createReportDoc(id: DocIdentity): Doc {
  const date = new Date(id.dateIso);
  if (!Number.isFinite(date.getTime()))
    throw new Error(`report date "${id.dateIso}" is not a time`);
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN + 14, bottom: MARGIN + 10, left: MARGIN, right: MARGIN },
    bufferPages: true,
    autoFirstPage: true,
    compress: true,
    info: {
      Title: id.title,
      Subject: id.subject,
      Author: 'efflux',
      Creator: 'efflux',
      Producer: 'efflux (pdfkit)',
      Keywords: `efflux-report ${id.kind} report-id ${id.reportId} content-sha256 ${id.contentSha256}`,
      CreationDate: date,
      ModDate: date,
      EffluxReportKind: id.kind,
      EffluxReportId: id.reportId,
      EffluxContentSha256: id.contentSha256,
      ...id.extra,
    } as PDFKit.DocumentInfo,
  });
  withBoundedWrapping(doc);
  doc.registerFont('regular', FONTS.regular);
  doc.registerFont('bold', FONTS.bold);
  doc.registerFont('mono', FONTS.mono);
  doc.font('regular').fontSize(9);
  (doc as any).file(new TextEncoder().encode(id.json), {
    name: 'report.json',
    type: 'application/json',
    description: `efflux ${id.kind} report ${id.reportId}`,
    creationDate: date,
    modifiedDate: date,
  });
  return doc;
}

/** Header and footer on every buffered page, then the bytes. */
export function finishReportDoc(doc: Doc, id: DocIdentity): Promise<Buffer> {
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const { width, height } = doc.page;
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0; // writing inside the margin must not start a new page
    doc.save();
    doc
      .font('bold')
      .fontSize(8)
      .fillColor('#1f2a36')
      .text(clipLine(id.title, 110), MARGIN, MARGIN - 18, {
        width: width - 2 * MARGIN - 150,
        lineBreak: false,
        ellipsis: true,
      });
    doc
      .font('mono')
      .fontSize(8)
      .fillColor('#1f2a36')
      .text(`report ${id.reportId}`, width - MARGIN - 150, MARGIN - 18, {
        width: 150,
        align: 'right',
        lineBreak: false,
      });
    doc
      .moveTo(MARGIN, MARGIN - 6)
      .lineTo(width - MARGIN, MARGIN - 6)
      .lineWidth(0.5)
      .strokeColor('#8a8f98')
      .stroke();
    doc
      .moveTo(MARGIN, height - MARGIN + 2)
      .lineTo(width - MARGIN, height - MARGIN + 2)
      .lineWidth(0.5)
      .strokeColor('#8a8f98')
      .stroke();
    doc
      .font('mono')
      .fontSize(6.5)
      .fillColor('#46505c')
      .text(
        `report ${id.reportId} · content SHA-256 ${id.contentSha256}`,
        MARGIN,
        height - MARGIN + 7,
        { width: width - 2 * MARGIN - 70, lineBreak: false },
      );
    doc
      .font('regular')
      .fontSize(7.5)
      .fillColor('#46505c')
      .text(
        `page ${i - range.start + 1} of ${range.count}`,
        width - MARGIN - 70,
        height - MARGIN + 6,
        { width: 70, align: 'right', lineBreak: false },
      );
    if (id.mark) drawMark(doc, id.mark);
    doc.restore();
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return done;
}

const MARK_RED = '#b8432f';

/**
 * The status in red under the header and a red rule round the page. Not a rotated word across the
 * page: text extractors read a diagonal word letter by letter into the lines it crosses.
 */
function drawMark(doc: Doc, mark: { word: string; meaning: string }): void {
  const { width, height } = doc.page;
  doc.save();
  doc
    .rect(MARGIN - 20, MARGIN - 30, width - 2 * MARGIN + 40, height - 2 * MARGIN + 50)
    .lineWidth(2.5)
    .strokeColor(MARK_RED)
    .strokeOpacity(0.55)
    .stroke();
  doc.restore();
  doc.save();
  doc
    .font('bold')
    .fontSize(9)
    .fillColor(MARK_RED)
    .text(`${mark.word} — ${mark.meaning}`, MARGIN, MARGIN - 3, {
      width: width - 2 * MARGIN,
      lineBreak: false,
    });
  doc.restore();
}
