/**
 * The schematic of connected vessels: each vessel a box drawn to one vertical scale (its height,
 * standing at its base elevation on the site datum), its outlet marked, and an arrow to the vessel
 * it discharges into — a dashed falling jet for a free outlet, a solid pipe into the receiver's
 * side for a submerged one. With steady levels it also shows the liquid at those levels.
 */
import { svg } from './dom.js';
import { num } from './format.js';

export interface SchematicVessel {
  id: string;
  name: string;
  heightM: number;
  widthM: number;
  baseM: number | null;
  outletM: number;
  dischargesTo: string | null;
  connection: 'free' | 'submerged';
}

/** The parts of a system file the schematic reads; absent numbers become plain defaults. */
export function schematicVessels(system: Record<string, unknown>): SchematicVessel[] {
  const vessels = Array.isArray(system.vessels)
    ? (system.vessels as Record<string, unknown>[])
    : [];
  return vessels.map((v) => {
    const shape = (v.shape ?? {}) as Record<string, unknown>;
    const outlet = (v.outlet ?? {}) as Record<string, unknown>;
    const n = (x: unknown, d: number) => (typeof x === 'number' && Number.isFinite(x) ? x : d);
    const points = Array.isArray(shape.points) ? (shape.points as [number, number][]) : null;
    const height = n(
      shape.heightM,
      points ? n(points[points.length - 1]?.[0], 1) : n(shape.diameterM, 1),
    );
    const width = n(
      shape.diameterM,
      n(
        shape.lengthM,
        n(shape.widthM, points ? Math.sqrt(n(points[points.length - 1]?.[1], 1)) : 1),
      ),
    );
    return {
      id: String(v.id ?? '?'),
      name: String(v.name ?? v.id ?? '?'),
      heightM: height,
      widthM: width,
      baseM: typeof v.baseElevationM === 'number' ? v.baseElevationM : null,
      outletM: n(outlet.elevationM, 0),
      dischargesTo: typeof v.dischargesTo === 'string' ? v.dischargesTo : null,
      connection: v.connection === 'submerged' ? 'submerged' : 'free',
    };
  });
}

const W = 860;
const H = 380;
const PAD = { top: 34, bottom: 46, left: 60, right: 30 };

export function systemSchematic(
  vessels: SchematicVessel[],
  levelsM: Record<string, number> | null = null,
): SVGElement {
  const known = vessels.every((v) => v.baseM !== null);
  const base = (v: SchematicVessel) => (known ? v.baseM! : 0);
  const lo = Math.min(0, ...vessels.map(base));
  const hi = Math.max(...vessels.map((v) => base(v) + v.heightM));
  const slot = (W - PAD.left - PAD.right) / Math.max(vessels.length, 1);
  // one scale for heights and widths, so the boxes keep their proportions
  const scale = Math.min(
    (H - PAD.top - PAD.bottom) / Math.max(hi - lo, 0.1),
    (slot * 0.55) / Math.max(...vessels.map((v) => v.widthM), 0.1),
  );
  const y = (m: number) => H - PAD.bottom - (m - lo) * scale;
  const root = svg('svg', {
    viewBox: `0 0 ${W} ${H}`,
    class: 'system-schematic',
    role: 'img',
    'aria-label': `Schematic of ${vessels.length} connected vessels`,
  });
  root.appendChild(
    svg(
      'defs',
      {},
      svg(
        'marker',
        {
          id: 'arrow-head',
          viewBox: '0 0 10 10',
          refX: '9',
          refY: '5',
          markerWidth: '7',
          markerHeight: '7',
          orient: 'auto-start-reverse',
        },
        svg('path', { d: 'M0,0 L10,5 L0,10 z', fill: '#1f3a4d' }),
      ),
    ),
  );
  // site datum line
  root.appendChild(
    svg('line', {
      x1: PAD.left - 20,
      x2: W - PAD.right,
      y1: y(lo),
      y2: y(lo),
      stroke: '#8b949b',
      'stroke-width': 1,
      'stroke-dasharray': '2 3',
    }),
  );
  root.appendChild(
    svg(
      'text',
      { x: PAD.left - 20, y: y(lo) + 16, class: 'sch-small' },
      known ? `site datum ${num(lo, 3)} m` : 'base elevations not given: drawn on one level',
    ),
  );
  const box = new Map<string, { x: number; w: number; v: SchematicVessel }>();
  vessels.forEach((v, i) => {
    const w = Math.max(v.widthM * scale, 28);
    const x = PAD.left + slot * i + (slot - w) / 2 - slot * 0.12;
    box.set(v.id, { x, w, v });
    const top = y(base(v) + v.heightM);
    const bottom = y(base(v));
    const level = levelsM?.[v.id];
    if (level !== undefined && Number.isFinite(level)) {
      const over = level > v.heightM;
      const ly = y(base(v) + Math.min(Math.max(level, 0), v.heightM));
      root.appendChild(
        svg('rect', {
          x,
          y: ly,
          width: w,
          height: bottom - ly,
          class: over ? 'sch-liquid sch-over' : 'sch-liquid',
        }),
      );
      root.appendChild(
        svg(
          'text',
          { x: x + 4, y: ly - 4, class: 'sch-small sch-level' },
          `${num(level, 3)} m${over ? ' (overflows)' : ''}`,
        ),
      );
    }
    root.appendChild(
      svg('rect', {
        x,
        y: top,
        width: w,
        height: bottom - top,
        class: 'sch-vessel',
        'data-vessel': v.id,
      }),
    );
    root.appendChild(
      svg(
        'text',
        { x: x + w / 2, y: top - 18, 'text-anchor': 'middle', class: 'sch-name' },
        v.name,
      ),
    );
    root.appendChild(
      svg(
        'text',
        { x: x + w / 2, y: top - 5, 'text-anchor': 'middle', class: 'sch-small' },
        `${num(v.heightM, 3)} m tall`,
      ),
    );
    // outlet at the right wall
    root.appendChild(
      svg('circle', { cx: x + w, cy: y(base(v) + v.outletM), r: 4, class: 'sch-outlet' }),
    );
  });
  for (const v of vessels) {
    const from = box.get(v.id)!;
    const ox = from.x + from.w;
    const oy = y(base(v) + v.outletM);
    const to = v.dischargesTo ? box.get(v.dischargesTo) : undefined;
    if (!to) {
      // discharges out of the system: a short arrow to the right
      root.appendChild(
        svg('line', {
          x1: ox,
          y1: oy,
          x2: ox + 34,
          y2: oy,
          class: 'sch-pipe',
          'marker-end': 'url(#arrow-head)',
        }),
      );
      root.appendChild(svg('text', { x: ox + 4, y: oy + 16, class: 'sch-small' }, 'out'));
      continue;
    }
    if (v.connection === 'submerged') {
      const ty = y(
        Math.min(
          Math.max(base(v) + v.outletM, base(to.v) + 0.05 * to.v.heightM),
          base(to.v) + 0.9 * to.v.heightM,
        ),
      );
      const tx = to.x;
      root.appendChild(
        svg('path', {
          d: `M${ox},${oy} L${(ox + tx) / 2},${oy} L${(ox + tx) / 2},${ty} L${tx},${ty}`,
          class: 'sch-pipe sch-submerged',
          'marker-end': 'url(#arrow-head)',
        }),
      );
      root.appendChild(
        svg(
          'text',
          { x: (ox + tx) / 2 + 4, y: Math.min(oy, ty) - 6, class: 'sch-small' },
          'submerged pipe',
        ),
      );
    } else {
      const tx = to.x + to.w * 0.35;
      const ty = y(base(to.v) + to.v.heightM) - 4;
      root.appendChild(
        svg('path', {
          d: `M${ox},${oy} Q${tx},${oy} ${tx},${ty}`,
          class: 'sch-pipe sch-free',
          'marker-end': 'url(#arrow-head)',
        }),
      );
      root.appendChild(svg('text', { x: ox + 6, y: oy - 6, class: 'sch-small' }, 'free jet'));
    }
  }
  // vertical scale bar: 1 m (or what fits)
  const barM = hi - lo > 4 ? 2 : hi - lo > 1.5 ? 1 : 0.5;
  root.appendChild(
    svg('line', {
      x1: 22,
      x2: 22,
      y1: y(lo),
      y2: y(lo + barM),
      stroke: '#1d2a33',
      'stroke-width': 2,
    }),
  );
  root.appendChild(svg('text', { x: 28, y: y(lo + barM / 2), class: 'sch-small' }, `${barM} m`));
  return root;
}

/**
 * Moves labels that would overlap an earlier one (names first, then heights, levels, links),
 * measured as drawn (getBBox, in the drawing's own units, so the result is the same at every
 * screen width), and keeps each inside the drawing. Call once the drawing is in the document.
 */
export function untangleLabels(root: SVGElement): void {
  const texts = Array.from(root.querySelectorAll<SVGTextElement>('text'));
  if (!texts.length || texts[0].getBBox().width === 0) return; // not laid out (hidden)
  const placed: DOMRect[] = [];
  const GAP = 2;
  const hits = (a: DOMRect, b: DOMRect) =>
    a.x < b.x + b.width + GAP &&
    b.x < a.x + a.width + GAP &&
    a.y < b.y + b.height + GAP &&
    b.y < a.y + a.height + GAP;
  for (const t of texts) {
    let box = t.getBBox();
    const dx = box.x < 2 ? 2 - box.x : box.x + box.width > W - 2 ? W - 2 - box.x - box.width : 0;
    if (dx) t.setAttribute('x', String(Number(t.getAttribute('x')) + dx));
    const y0 = Number(t.getAttribute('y'));
    const step = box.height + GAP;
    for (const k of [0, -1, 1, -2, 2, -3, 3, -4, 4, -5, 5]) {
      const y = Math.min(Math.max(y0 + k * step, step), H - 2);
      t.setAttribute('y', String(y));
      box = t.getBBox();
      if (!placed.some((p) => hits(p, box))) break;
    }
    placed.push(box);
  }
}
