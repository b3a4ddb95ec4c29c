/**
 * A to-scale side view of a vessel from its vessel file: the outline from the shape's half-width
 * at each height, the outlet and the sensor zero (or a roof gauge's face) at their elevations, and
 * a scale bar. A lying cylinder and a sphere are drawn as the end view (the view the level sees);
 * a stage–area table as a square plan of the same area at each height. Attributes only, no styles
 * (the service's Content-Security-Policy refuses inline style).
 */
import { svg } from './dom.js';

type Spec = Record<string, unknown>;
const n = (v: unknown, d = 0) => (typeof v === 'number' && Number.isFinite(v) ? v : d);

interface Profile {
  heightM: number;
  halfWidth: (y: number) => number;
  view: string;
}

export function profileOf(shape: Spec): Profile {
  const kind = String(shape.kind);
  const D = n(shape.diameterM, 1);
  const r = D / 2;
  const circle = (y: number) => Math.sqrt(Math.max(0, r * r - (y - r) * (y - r)));
  switch (kind) {
    case 'vertical-cylinder':
      return { heightM: n(shape.heightM, D), halfWidth: () => r, view: 'side view' };
    case 'rectangular':
      return {
        heightM: n(shape.heightM, n(shape.lengthM, 1)),
        halfWidth: () => n(shape.lengthM, 1) / 2,
        view: `side view along the ${n(shape.lengthM, 1)} m length`,
      };
    case 'horizontal-cylinder':
      return { heightM: D, halfWidth: circle, view: `end view (${n(shape.lengthM, 0)} m long)` };
    case 'sphere':
      return { heightM: D, halfWidth: circle, view: 'side view' };
    case 'cone-bottom': {
      const hc = n(shape.coneHeightM, r);
      return {
        heightM: n(shape.heightM, hc + D),
        halfWidth: (y) => (y < hc ? (r * y) / hc : r),
        view: 'side view',
      };
    }
    case 'elliptical-head-cylinder': {
      const b = D / 4; // a 2:1 head is a quarter of the diameter deep
      return {
        heightM: n(shape.heightM, b + D),
        halfWidth: (y) => (y < b ? r * Math.sqrt(Math.max(0, 1 - ((b - y) / b) ** 2)) : r),
        view: 'side view',
      };
    }
    case 'table': {
      const pts = (Array.isArray(shape.points) ? shape.points : []) as [number, number][];
      const area = (y: number) => {
        if (!pts.length) return 1;
        if (y <= pts[0][0]) return pts[0][1];
        for (let i = 1; i < pts.length; i++) {
          if (y <= pts[i][0]) {
            const [y0, a0] = pts[i - 1],
              [y1, a1] = pts[i];
            return a0 + ((a1 - a0) * (y - y0)) / (y1 - y0 || 1);
          }
        }
        return pts[pts.length - 1][1];
      };
      return {
        heightM: n(shape.heightM, pts.length ? pts[pts.length - 1][0] : 1),
        halfWidth: (y) => Math.sqrt(area(y)) / 2,
        view: 'square plan of the same area at each height',
      };
    }
    default:
      return { heightM: 1, halfWidth: () => 0.5, view: 'shape not known to this page' };
  }
}

export interface Marks {
  outlets: { name: string; elevationM: number }[];
  sensorZeroM: number | null;
  mountElevationM: number | null;
}

export function vesselDrawing(spec: Spec, marks: Marks, size = { w: 340, h: 320 }): SVGElement {
  const p = profileOf((spec.shape ?? {}) as Spec);
  let maxHalf = 0;
  const steps = 120;
  const ys: number[] = [];
  for (let i = 0; i <= steps; i++) ys.push((p.heightM * i) / steps);
  for (const y of ys) maxHalf = Math.max(maxHalf, p.halfWidth(y));
  const top = Math.max(p.heightM, marks.mountElevationM ?? 0);
  // left: the scale bar; right: room for the outlet's label
  const padLeft = 64,
    padRight = 96,
    padV = 36;
  const scale = Math.min(
    (size.w - padLeft - padRight) / (2 * maxHalf || 1),
    (size.h - 2 * padV) / (top || 1),
  );
  const cx = padLeft + maxHalf * scale;
  const pad = padV;
  const bottom = size.h - pad;
  const X = (x: number) => (cx + x * scale).toFixed(1);
  const Y = (y: number) => (bottom - y * scale).toFixed(1);

  const right = ys.map((y) => `${X(p.halfWidth(y))},${Y(y)}`);
  const left = ys
    .slice()
    .reverse()
    .map((y) => `${X(-p.halfWidth(y))},${Y(y)}`);
  const closed = p.heightM > 0 && p.halfWidth(p.heightM) < 1e-9;
  const outline = svg('polygon', {
    points: [...right, ...left].join(' '),
    fill: '#e4eef2',
    stroke: '#1f3a4d',
    'stroke-width': 2,
  });
  const parts: SVGElement[] = [outline];
  if (!closed) {
    // open or flat top: draw the top edge dashed, since heightM may only be the useful height
    parts.push(
      svg('line', {
        x1: X(-p.halfWidth(p.heightM)),
        y1: Y(p.heightM),
        x2: X(p.halfWidth(p.heightM)),
        y2: Y(p.heightM),
        stroke: '#1f3a4d',
        'stroke-width': 1,
        'stroke-dasharray': '4 3',
      }),
    );
  }
  const label = (x: number, y: number, text: string, anchor = 'start', colour = '#1d2a33') =>
    svg(
      'text',
      {
        x: x.toFixed(1),
        y: y.toFixed(1),
        'font-size': 12,
        'text-anchor': anchor,
        fill: colour,
        'font-family': 'system-ui, sans-serif',
      },
      text,
    );

  for (const o of marks.outlets) {
    const hw = p.halfWidth(o.elevationM);
    const y = Number(Y(o.elevationM));
    if (hw < maxHalf * 0.05 || o.elevationM <= 1e-6) {
      // at the lowest point: the outlet leaves downwards
      parts.push(
        svg('rect', {
          x: (cx - 5).toFixed(1),
          y: y.toFixed(1),
          width: 10,
          height: 16,
          fill: '#c4521c',
        }),
      );
      parts.push(
        label(cx + 10, y + 14, `outlet ${o.name} (${o.elevationM} m)`, 'start', '#8a3512'),
      );
    } else {
      const x = Number(X(hw));
      parts.push(
        svg('rect', {
          x: x.toFixed(1),
          y: (y - 5).toFixed(1),
          width: 18,
          height: 10,
          fill: '#c4521c',
        }),
      );
      parts.push(label(x + 22, y - 8, `outlet ${o.name}`, 'start', '#8a3512'));
      parts.push(label(x + 22, y + 16, `${o.elevationM} m up`, 'start', '#8a3512'));
    }
  }
  if (marks.sensorZeroM !== null) {
    const y = Y(marks.sensorZeroM);
    parts.push(
      svg('line', {
        x1: X(-maxHalf),
        y1: y,
        x2: X(maxHalf),
        y2: y,
        stroke: '#2e8b78',
        'stroke-width': 1.5,
        'stroke-dasharray': '6 4',
      }),
    );
    parts.push(
      svg('circle', { cx: X(-p.halfWidth(marks.sensorZeroM)), cy: y, r: 4, fill: '#2e8b78' }),
    );
    parts.push(
      label(
        Number(X(-p.halfWidth(marks.sensorZeroM))) + 8,
        Number(y) - 6,
        'sensor zero',
        'start',
        '#1f6b5b',
      ),
    );
  }
  if (marks.mountElevationM !== null) {
    const y = Number(Y(marks.mountElevationM));
    parts.push(
      svg('rect', {
        x: (cx - 8).toFixed(1),
        y: (y - 8).toFixed(1),
        width: 16,
        height: 8,
        fill: '#2e8b78',
      }),
    );
    parts.push(
      svg('line', {
        x1: cx.toFixed(1),
        y1: y.toFixed(1),
        x2: cx.toFixed(1),
        y2: (y + 28).toFixed(1),
        stroke: '#2e8b78',
        'stroke-width': 1.5,
        'stroke-dasharray': '3 3',
      }),
    );
    parts.push(label(cx + 12, y - 2, 'gauge face (measures down)', 'start', '#1f6b5b'));
  }
  // scale bar: a round length near a quarter of the drawing's height
  const nice = [0.1, 0.2, 0.25, 0.5, 1, 2, 2.5, 5, 10, 20, 50];
  const want = top / 4;
  const bar = nice.reduce((best, v) => (Math.abs(v - want) < Math.abs(best - want) ? v : best), 1);
  const bx = 16;
  parts.push(
    svg('line', {
      x1: bx,
      y1: bottom,
      x2: bx,
      y2: (bottom - bar * scale).toFixed(1),
      stroke: '#1d2a33',
      'stroke-width': 3,
    }),
  );
  parts.push(label(bx + 6, bottom - (bar * scale) / 2, `${bar} m`, 'start'));
  parts.push(
    svg('line', {
      x1: 8,
      y1: bottom,
      x2: size.w - 8,
      y2: bottom,
      stroke: '#9aa4ab',
      'stroke-width': 1,
    }),
  );
  parts.push(label(8, size.h - 10, p.view, 'start', '#4a5560'));

  const root = svg('svg', {
    viewBox: `0 0 ${size.w} ${size.h}`,
    width: size.w,
    height: size.h,
    role: 'img',
    class: 'vessel-drawing',
  });
  root.appendChild(
    svg(
      'title',
      {},
      `Drawing to scale: ${p.view}; height ${p.heightM} m${marks.outlets.length ? `; outlet at ${marks.outlets.map((o) => `${o.elevationM} m`).join(', ')}` : ''}`,
    ),
  );
  for (const el of parts) root.appendChild(el);
  return root;
}
