/** Flowing layout on a pdfkit page: headings, paragraphs, label–value rows and ruled tables. */
import { MARGIN, type Doc } from './pdf-doc.js';

const INK = '#1f2a36';
const MUTED = '#46505c';

export const contentWidth = (doc: Doc) => doc.page.width - 2 * MARGIN;
const bottomLimit = (doc: Doc) => doc.page.height - doc.page.margins.bottom;

/** Starts a new page unless `height` points still fit on this one. */
export function ensureRoom(doc: Doc, height: number): void {
  if (doc.y + height > bottomLimit(doc)) doc.addPage();
}

export function heading(doc: Doc, text: string, size = 11.5): void {
  ensureRoom(doc, size * 4);
  doc.moveDown(0.6);
  doc
    .font('bold')
    .fontSize(size)
    .fillColor(INK)
    .text(text, MARGIN, doc.y, { width: contentWidth(doc) });
  doc.moveDown(0.25);
}

export function paragraph(
  doc: Doc,
  text: string,
  opts: { size?: number; mono?: boolean; muted?: boolean } = {},
): void {
  doc
    .font(opts.mono ? 'mono' : 'regular')
    .fontSize(opts.size ?? 8.5)
    .fillColor(opts.muted ? MUTED : INK);
  ensureRoom(doc, doc.heightOfString(text, { width: contentWidth(doc) }));
  doc.text(text, MARGIN, doc.y, { width: contentWidth(doc) });
  doc.moveDown(0.2);
}

/** Label–value rows: labels in a narrow column, values wrapping in the rest. */
export function fields(
  doc: Doc,
  rows: [string, string][],
  labelWidth = 130,
  opts: { monoValues?: boolean } = {},
): void {
  const w = contentWidth(doc) - labelWidth;
  for (const [label, value] of rows) {
    doc.font(opts.monoValues ? 'mono' : 'regular').fontSize(8.5);
    const h = Math.max(doc.heightOfString(value || '—', { width: w }), 11);
    ensureRoom(doc, h + 2);
    const y = doc.y;
    doc
      .font('bold')
      .fontSize(8.5)
      .fillColor(MUTED)
      .text(label, MARGIN, y, { width: labelWidth - 6 });
    doc
      .font(opts.monoValues ? 'mono' : 'regular')
      .fontSize(8.5)
      .fillColor(INK)
      .text(value || '—', MARGIN + labelWidth, y, { width: w });
    doc.y = y + h + 2;
  }
}

export interface Column {
  title: string;
  width: number;
  align?: 'left' | 'right';
  mono?: boolean;
}

/** A ruled table; the header repeats after a page break. */
export function table(doc: Doc, columns: Column[], rows: string[][], size = 7.8): void {
  const total = columns.reduce((s, c) => s + c.width, 0);
  const scale = contentWidth(doc) / total;
  const cols = columns.map((c) => ({ ...c, width: c.width * scale }));
  const pad = 3;
  const rowHeight = (cells: string[], bold: boolean) =>
    Math.max(
      ...cells.map((cell, i) => {
        doc.font(bold ? 'bold' : cols[i].mono ? 'mono' : 'regular').fontSize(size);
        return doc.heightOfString(cell || '—', { width: cols[i].width - 2 * pad });
      }),
    ) +
    2 * pad;
  const drawRow = (cells: string[], bold: boolean, shade: boolean) => {
    const h = rowHeight(cells, bold);
    const y = doc.y;
    if (shade) doc.rect(MARGIN, y, contentWidth(doc), h).fill(bold ? '#e6e9ee' : '#f5f6f8');
    let x = MARGIN;
    cells.forEach((cell, i) => {
      const c = cols[i];
      doc
        .font(bold ? 'bold' : c.mono ? 'mono' : 'regular')
        .fontSize(size)
        .fillColor(INK);
      doc.text(cell || '—', x + pad, y + pad, {
        width: c.width - 2 * pad,
        align: c.align ?? 'left',
      });
      x += c.width;
    });
    doc
      .moveTo(MARGIN, y + h)
      .lineTo(MARGIN + contentWidth(doc), y + h)
      .lineWidth(0.3)
      .strokeColor('#b9bec6')
      .stroke();
    doc.y = y + h;
    return h;
  };
  const header = columns.map((c) => c.title);
  ensureRoom(doc, rowHeight(header, true) + 14);
  drawRow(header, true, true);
  rows.forEach((r, i) => {
    if (doc.y + rowHeight(r, false) > bottomLimit(doc)) {
      doc.addPage();
      drawRow(header, true, true);
    }
    drawRow(r, false, i % 2 === 1);
  });
  doc.x = MARGIN;
  doc.moveDown(0.4);
}
