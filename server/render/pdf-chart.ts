/**
 * Vector charts in a pdfkit document, drawn from the data (no raster, no chart library): axes with
 * "nice" ticks, lines, points with error bars, a shaded band, horizontal and vertical markers.
 */
import type { Doc } from './pdf-doc.js';
import { tickText } from './report-format.js';
import { linearScale, niceTicks, type Scale } from './svg-chart.js';

export interface ChartFrame {
  x: number;
  y: number;
  width: number;
  height: number;
}

export type Layer =
  | {
      kind: 'line';
      xs: ArrayLike<number>;
      ys: ArrayLike<number>;
      color: string;
      width?: number;
      dash?: number;
    }
  | {
      kind: 'points';
      xs: ArrayLike<number>;
      ys: ArrayLike<number>;
      color: string;
      radius?: number;
      errors?: ArrayLike<number>;
    }
  | {
      kind: 'band';
      xs: ArrayLike<number>;
      lower: ArrayLike<number>;
      upper: ArrayLike<number>;
      color: string;
      opacity?: number;
    }
  | {
      kind: 'hline';
      y: number;
      x0?: number;
      x1?: number;
      color: string;
      dash?: number;
      label?: string;
    }
  | { kind: 'vline'; x: number; color: string; dash?: number; label?: string };

export interface ChartSpec {
  xDomain: [number, number];
  yDomain: [number, number];
  xLabel: string;
  yLabel: string;
  xTicks?: { value: number; label: string }[];
  yFormat?: (v: number) => string;
  layers: Layer[];
  legend?: { label: string; color: string }[];
}

export function drawChart(doc: Doc, f: ChartFrame, spec: ChartSpec): void {
  const sx = linearScale(spec.xDomain[0], spec.xDomain[1], f.x, f.x + f.width);
  // room at the top for the legend, so it never hides a data point
  const [y0, y1] = spec.yDomain;
  const yTop = spec.legend?.length ? y1 + ((y1 - y0) * 14) / f.height : y1;
  const sy = linearScale(y0, yTop, f.y + f.height, f.y);
  doc.save();
  doc.rect(f.x, f.y, f.width, f.height).fill('#fbfaf7');
  const yTicks = niceTicks(y0, yTop, 5);
  const yFmt = spec.yFormat ?? tickText(yTicks);
  doc.font('regular').fontSize(6.5).fillColor('#46505c');
  for (const t of yTicks) {
    const py = sy(t);
    if (py < f.y - 0.5 || py > f.y + f.height + 0.5) continue;
    doc
      .moveTo(f.x, py)
      .lineTo(f.x + f.width, py)
      .lineWidth(0.25)
      .strokeColor('#dde0e5')
      .stroke();
    doc.text(yFmt(t), f.x - 44, py - 3, { width: 41, align: 'right', lineBreak: false });
  }
  const xNice = niceTicks(spec.xDomain[0], spec.xDomain[1], 6);
  const xFmt = tickText(xNice);
  const xTicks = spec.xTicks ?? xNice.map((v) => ({ value: v, label: xFmt(v) }));
  for (const t of xTicks) {
    const px = sx(t.value);
    if (px < f.x - 0.5 || px > f.x + f.width + 0.5) continue;
    doc
      .moveTo(px, f.y)
      .lineTo(px, f.y + f.height)
      .lineWidth(0.25)
      .strokeColor('#dde0e5')
      .stroke();
    doc.text(t.label, px - 30, f.y + f.height + 3, {
      width: 60,
      align: 'center',
      lineBreak: false,
    });
  }
  doc.rect(f.x, f.y, f.width, f.height).clip();
  for (const layer of spec.layers) drawLayer(doc, layer, sx, sy, f);
  doc.restore();
  doc.save();
  doc.rect(f.x, f.y, f.width, f.height).lineWidth(0.6).strokeColor('#8a8f98').stroke();
  doc.font('regular').fontSize(7).fillColor('#1f2a36');
  doc.text(spec.xLabel, f.x, f.y + f.height + 12, {
    width: f.width,
    align: 'center',
    lineBreak: false,
  });
  doc.rotate(-90, { origin: [f.x - 48, f.y + f.height / 2] });
  doc.text(spec.yLabel, f.x - 48 - f.height / 2, f.y + f.height / 2 - 4, {
    width: f.height,
    align: 'center',
    lineBreak: false,
  });
  doc.restore();
  if (spec.legend?.length) {
    let lx = f.x + 6;
    doc.save().font('regular').fontSize(6.5);
    for (const item of spec.legend) {
      doc.rect(lx, f.y + 6, 9, 3).fill(item.color);
      doc.fillColor('#1f2a36').text(item.label, lx + 12, f.y + 4, { lineBreak: false });
      lx += 20 + doc.widthOfString(item.label);
    }
    doc.restore();
  }
}

function drawLayer(doc: Doc, l: Layer, sx: Scale, sy: Scale, f: ChartFrame): void {
  switch (l.kind) {
    case 'line': {
      let started = false;
      for (let i = 0; i < l.xs.length; i++) {
        if (!Number.isFinite(l.ys[i]) || !Number.isFinite(l.xs[i])) {
          started = false;
          continue;
        }
        if (started) doc.lineTo(sx(l.xs[i]), sy(l.ys[i]));
        else doc.moveTo(sx(l.xs[i]), sy(l.ys[i]));
        started = true;
      }
      doc.lineWidth(l.width ?? 0.8).strokeColor(l.color);
      if (l.dash) doc.dash(l.dash, { space: l.dash });
      doc.stroke();
      doc.undash();
      return;
    }
    case 'points': {
      for (let i = 0; i < l.xs.length; i++) {
        if (!Number.isFinite(l.ys[i])) continue;
        const px = sx(l.xs[i]);
        const py = sy(l.ys[i]);
        const e = l.errors?.[i];
        if (e !== undefined && Number.isFinite(e)) {
          doc
            .moveTo(px, sy(l.ys[i] - e))
            .lineTo(px, sy(l.ys[i] + e))
            .lineWidth(0.6)
            .strokeColor(l.color)
            .stroke();
        }
        doc.circle(px, py, l.radius ?? 1.6).fill(l.color);
      }
      return;
    }
    case 'band': {
      const n = l.xs.length;
      if (n < 2) return;
      doc.moveTo(sx(l.xs[0]), sy(l.upper[0]));
      for (let i = 1; i < n; i++) doc.lineTo(sx(l.xs[i]), sy(l.upper[i]));
      for (let i = n - 1; i >= 0; i--) doc.lineTo(sx(l.xs[i]), sy(l.lower[i]));
      doc
        .closePath()
        .fillOpacity(l.opacity ?? 0.22)
        .fill(l.color)
        .fillOpacity(1);
      return;
    }
    case 'hline': {
      const x0 = l.x0 === undefined ? f.x : sx(l.x0);
      const x1 = l.x1 === undefined ? f.x + f.width : sx(l.x1);
      doc.moveTo(x0, sy(l.y)).lineTo(x1, sy(l.y)).lineWidth(0.8).strokeColor(l.color);
      if (l.dash) doc.dash(l.dash, { space: l.dash });
      doc.stroke().undash();
      if (l.label)
        doc
          .font('regular')
          .fontSize(6.5)
          .fillColor(l.color)
          .text(l.label, x0 + 3, sy(l.y) - 9, { lineBreak: false });
      return;
    }
    case 'vline': {
      doc
        .moveTo(sx(l.x), f.y)
        .lineTo(sx(l.x), f.y + f.height)
        .lineWidth(0.7)
        .strokeColor(l.color);
      if (l.dash) doc.dash(l.dash, { space: l.dash });
      doc.stroke().undash();
      if (l.label)
        doc
          .font('regular')
          .fontSize(6.5)
          .fillColor(l.color)
          .text(l.label, sx(l.x) + 2, f.y + 14, { lineBreak: false });
      return;
    }
  }
}

/** Domain of several arrays, padded 4 %; ignores non-finite values. */
export function domainOf(...arrays: ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const a of arrays)
    for (let i = 0; i < a.length; i++)
      if (Number.isFinite(a[i])) (lo = Math.min(lo, a[i])), (hi = Math.max(hi, a[i]));
  if (lo === Infinity) return [0, 1];
  if (lo === hi) return [lo - Math.abs(lo || 1) * 0.05, hi + Math.abs(hi || 1) * 0.05];
  const pad = (hi - lo) * 0.04;
  return [lo - pad, hi + pad];
}
