/**
 * Flowing layout on a pdfkit page: headings, paragraphs, label–value rows, ruled tables and
 * figures. Keeps things together a reader expects together: a heading with what follows it, a
 * chart with its caption, a table header with at least two rows. Where figures and table headers
 * land is recorded (layoutRecord) so a test can check the rendered pages against it.
 */
import { MARGIN, type Doc } from './pdf-doc.js';

const INK = '#1f2a36';
const MUTED = '#46505c';

export const contentWidth = (doc: Doc) => doc.page.width - 2 * MARGIN;
const bottomLimit = (doc: Doc) => doc.page.height - doc.page.margins.bottom;

/** Where a figure or a table header was placed: page index from 0, y from the top in points. */
export type LayoutEntry =
  | {
      kind: 'figure';
      page: number;
      top: number;
      bottom: number;
      /** The figure's title line and the first words of its caption, as drawn. */
      title: string;
      caption: string;
    }
  | {
      kind: 'table-header';
      page: number;
      top: number;
      bottom: number;
      /** The first column's title, and the first cells of the rows drawn under it on that page. */
      title: string;
      rowsBelow: string[];
    };

/** What a renderer can be asked for besides the bytes: `layout` receives where things landed. */
export interface RenderOptions {
  layout?: LayoutEntry[];
}

const records = new WeakMap<Doc, LayoutEntry[]>();

/** The figures and table headers laid out so far in this document. */
export function layoutRecord(doc: Doc): LayoutEntry[] {
  let r = records.get(doc);
  if (!r) records.set(doc, (r = []));
  return r;
}

const pageIndex = (doc: Doc) => {
  const range = doc.bufferedPageRange();
  return range.start + range.count - 1;
};

/** Starts a new page unless `height` points still fit on this one. */
export function ensureRoom(doc: Doc, height: number): void {
  if (doc.y + height > bottomLimit(doc)) doc.addPage();
}

/** A section heading; `keepWith` points of what follows must fit under it, or it starts a new page. */
export function heading(doc: Doc, text: string, size = 11.5, keepWith = 60): void {
  ensureRoom(doc, size * 2 + keepWith);
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
/**
 * Column widths: the given proportions, widened where a column's longest word would not fit (a
 * word broken mid-way reads as two), the widening taken from columns with room to spare.
 */
function columnWidths(doc: Doc, columns: Column[], rows: string[][], size: number, pad: number) {
  const total = columns.reduce((s, c) => s + c.width, 0);
  const width = contentWidth(doc);
  const widths = columns.map((c) => (c.width * width) / total);
  const need = columns.map((c, i) => {
    let w = 0;
    const measure = (text: string, font: string) => {
      doc.font(font).fontSize(size);
      for (const word of (text || '—').split(/\s+/))
        if (word) w = Math.max(w, doc.widthOfString(word));
    };
    measure(c.title, 'bold');
    for (const r of rows) measure(r[i] ?? '', c.mono ? 'mono' : 'regular');
    return Math.min(w + 2 * pad + 0.5, width / 2);
  });
  if (need.reduce((a, b) => a + b, 0) > width) return widths; // cannot fit: keep the proportions
  for (let pass = 0; pass < 4; pass++) {
    const short = widths.reduce((s, w, i) => s + Math.max(0, need[i] - w), 0);
    if (short <= 0.01) break;
    const spare = widths.map((w, i) => Math.max(0, w - need[i]));
    const spareTotal = spare.reduce((a, b) => a + b, 0);
    if (spareTotal <= 0) break;
    const take = Math.min(1, short / spareTotal);
    for (let i = 0; i < widths.length; i++)
      widths[i] = widths[i] < need[i] ? need[i] : widths[i] - spare[i] * take;
  }
  return widths;
}

/** A ruled table; the header repeats after a page break and never ends a page without two rows under it. */
export function table(doc: Doc, columns: Column[], given: string[][], size = 7.8): void {
  const pad = 3;
  const rows = given.length ? given : [['none', ...columns.slice(1).map(() => '')]];
  const widths = columnWidths(doc, columns, rows, size, pad);
  const cols = columns.map((c, i) => ({ ...c, width: widths[i] }));
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
  const log = layoutRecord(doc);
  let current: Extract<LayoutEntry, { kind: 'table-header' }> | null = null;
  const drawHeader = () => {
    const top = doc.y;
    drawRow(header, true, true);
    current = {
      kind: 'table-header',
      page: pageIndex(doc),
      top,
      bottom: doc.y,
      title: header[0],
      rowsBelow: [],
    };
    log.push(current);
  };
  // the header and the next two rows (or all of them, when fewer) together
  ensureRoom(
    doc,
    rowHeight(header, true) + rows.slice(0, 2).reduce((h, r) => h + rowHeight(r, false), 0),
  );
  drawHeader();
  rows.forEach((r, i) => {
    if (doc.y + rowHeight(r, false) > bottomLimit(doc)) {
      doc.addPage();
      drawHeader();
    }
    drawRow(r, false, i % 2 === 1);
    current?.rowsBelow.push(r[0] || '—');
  });
  doc.x = MARGIN;
  doc.moveDown(0.4);
}

/**
 * A chart with its title above and its caption below, kept on one page: when the whole block would
 * not fit under the current position, it starts a new page. `draw` gets the chart's frame (plot
 * area); `below` is the room the chart needs under its frame for tick labels and the axis title.
 */
export function figure(
  doc: Doc,
  spec: {
    title: string;
    caption: string;
    height: number;
    left?: number;
    below?: number;
    draw: (frame: { x: number; y: number; width: number; height: number }) => void;
  },
): void {
  const width = contentWidth(doc);
  const left = spec.left ?? 56;
  const below = spec.below ?? 26;
  doc.font('bold').fontSize(9.5);
  const titleH = doc.heightOfString(spec.title, { width });
  doc.font('regular').fontSize(7.5);
  const captionH = doc.heightOfString(spec.caption, { width });
  const total = 8 + titleH + 6 + spec.height + below + captionH + 6;
  ensureRoom(doc, total);
  doc.moveDown(0.4);
  const top = doc.y;
  doc.font('bold').fontSize(9.5).fillColor(INK).text(spec.title, MARGIN, top, { width });
  const frame = {
    x: MARGIN + left,
    y: top + titleH + 6,
    width: width - left - 4,
    height: spec.height,
  };
  spec.draw(frame);
  const captionTop = frame.y + spec.height + below;
  doc
    .font('regular')
    .fontSize(7.5)
    .fillColor(MUTED)
    .text(spec.caption, MARGIN, captionTop, { width });
  doc.x = MARGIN;
  doc.y = captionTop + captionH + 6;
  layoutRecord(doc).push({
    kind: 'figure',
    page: pageIndex(doc),
    top,
    bottom: captionTop + captionH,
    title: spec.title,
    caption: spec.caption,
  });
}
