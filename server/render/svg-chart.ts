/**
 * Minimal vector charting for SVG output: linear scales, "nice" ticks, polylines. Pure string
 * building; every text is escaped.
 */
export function escapeXml(s: string): string {
  return s.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

export interface Scale {
  (v: number): number;
  domain: [number, number];
}

export function linearScale(d0: number, d1: number, r0: number, r1: number): Scale {
  const span = d1 - d0 || 1;
  const f = ((v: number) => r0 + ((v - d0) / span) * (r1 - r0)) as Scale;
  f.domain = [d0, d1];
  return f;
}

/** Tick values at 1, 2 or 5 × 10^k spacing, about `count` of them. */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step)
    out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

export function extent(...arrays: ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const a of arrays)
    for (let i = 0; i < a.length; i++)
      if (Number.isFinite(a[i])) (lo = Math.min(lo, a[i])), (hi = Math.max(hi, a[i]));
  if (lo === Infinity) return [0, 1];
  if (lo === hi) return [lo - 0.5, hi + 0.5];
  const pad = (hi - lo) * 0.04;
  return [lo - pad, hi + pad];
}

export function polyline(
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  sx: Scale,
  sy: Scale,
  style: string,
): string {
  const pts: string[] = [];
  for (let i = 0; i < xs.length; i++)
    if (Number.isFinite(ys[i])) pts.push(`${sx(xs[i]).toFixed(1)},${sy(ys[i]).toFixed(1)}`);
  return `<polyline fill="none" ${style} points="${pts.join(' ')}"/>`;
}

export interface Frame {
  x: number;
  y: number;
  width: number;
  height: number;
}

export function axes(
  frame: Frame,
  sx: Scale,
  sy: Scale,
  xLabel: string,
  yLabel: string,
  fmt = (v: number) => String(+v.toPrecision(4)),
): string {
  const { x, y, width, height } = frame;
  const parts: string[] = [
    `<rect x="${x}" y="${y}" width="${width}" height="${height}" fill="#fbfaf7" stroke="#8a8f98" stroke-width="0.8"/>`,
  ];
  for (const t of niceTicks(sx.domain[0], sx.domain[1])) {
    const px = sx(t);
    if (px < x - 0.5 || px > x + width + 0.5) continue;
    parts.push(
      `<line x1="${px.toFixed(1)}" y1="${y}" x2="${px.toFixed(1)}" y2="${y + height}" stroke="#e4e2dc" stroke-width="0.6"/>`,
    );
    parts.push(
      `<text x="${px.toFixed(1)}" y="${y + height + 14}" font-size="10" text-anchor="middle" fill="#444">${escapeXml(fmt(t))}</text>`,
    );
  }
  for (const t of niceTicks(sy.domain[0], sy.domain[1], 5)) {
    const py = sy(t);
    if (py < y - 0.5 || py > y + height + 0.5) continue;
    parts.push(
      `<line x1="${x}" y1="${py.toFixed(1)}" x2="${x + width}" y2="${py.toFixed(1)}" stroke="#e4e2dc" stroke-width="0.6"/>`,
    );
    parts.push(
      `<text x="${x - 6}" y="${(py + 3).toFixed(1)}" font-size="10" text-anchor="end" fill="#444">${escapeXml(fmt(t))}</text>`,
    );
  }
  parts.push(
    `<text x="${x + width / 2}" y="${y + height + 30}" font-size="11" text-anchor="middle" fill="#222">${escapeXml(xLabel)}</text>`,
  );
  parts.push(
    `<text transform="translate(${x - 48},${y + height / 2}) rotate(-90)" font-size="11" text-anchor="middle" fill="#222">${escapeXml(yLabel)}</text>`,
  );
  return parts.join('\n');
}
