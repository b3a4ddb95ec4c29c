/**
 * The charts, all uPlot: columnar arrays with ascending x, `null` for gaps. Long logs are
 * decimated for drawing (decimate.ts); the window is shaded under the data and can be redrawn by
 * dragging across the chart; uncertainty is drawn as bars (whiskers) or as a band of two series.
 */
import uPlot from 'uplot';
import { decimate } from './decimate.js';

export const COLOURS = {
  level: '#2f5f8a',
  fitted: '#c4521c',
  windowFill: 'rgba(46, 139, 120, 0.16)',
  windowEdge: '#2e8b78',
  residual: '#5d4a8c',
  band: 'rgba(93, 74, 140, 0.14)',
  approved: '#2e7d4f',
  draft: '#9a7b16',
  rejected: '#a33a3a',
  maintenance: '#7a5c2e',
  threshold: '#a33a3a',
  grid: '#dcd8cc',
  axis: '#3d4650',
};

const axis = (label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis => ({
  label,
  stroke: COLOURS.axis,
  grid: { stroke: COLOURS.grid, width: 1 },
  ticks: { stroke: COLOURS.grid, width: 1 },
  font: '12px system-ui, sans-serif',
  labelFont: '12px system-ui, sans-serif',
  ...extra,
});

/**
 * Date axes in ISO 8601, UTC (the rest of the workbench writes dates so): ticks are placed on UTC
 * day and month boundaries (tzDate) and labelled YYYY-MM-DD, or YYYY-MM-DD hh:mm under a day.
 */
export const isoDateTicks = (
  _u: uPlot,
  splits: number[],
  _axis: number,
  _space: number,
  incr: number,
): string[] =>
  splits.map((s) => {
    const d = new Date(s * 1000).toISOString();
    return incr < 86400 ? d.slice(0, 16).replace('T', ' ') : d.slice(0, 10);
  });
/** Least pixels between date ticks, so 10-character ISO dates never overlap. */
export const ISO_DATE_SPACE = 96;
export const utcDate = (ts: number) => uPlot.tzDate(new Date(ts * 1000), 'Etc/UTC');
/** A hover legend's date: ISO, UTC. */
export const isoDateValue = (_u: uPlot, v: number | null) =>
  v === null ? '—' : new Date(v * 1000).toISOString().slice(0, 10);

/** A dashed vertical "today" line with its date, on an overlay's canvas (x in seconds). */
export function drawToday(u: uPlot, nowS: number): void {
  const { left, top, width, height } = u.bbox;
  const x = u.valToPos(nowS, 'x', true);
  if (!(x >= left && x <= left + width)) return;
  const ctx = u.ctx;
  const dpr = devicePixelRatio;
  ctx.save();
  ctx.strokeStyle = COLOURS.axis;
  ctx.lineWidth = 1 * dpr;
  ctx.setLineDash([2 * dpr, 2 * dpr]);
  ctx.beginPath();
  ctx.moveTo(x, top);
  ctx.lineTo(x, top + height);
  ctx.stroke();
  ctx.setLineDash([]);
  ctx.fillStyle = COLOURS.axis;
  ctx.font = `${11 * dpr}px system-ui, sans-serif`;
  const label = `today ${new Date(nowS * 1000).toISOString().slice(0, 10)}`;
  const tw = ctx.measureText(label).width;
  ctx.fillText(
    label,
    x + 4 * dpr + tw > left + width ? x - 4 * dpr - tw : x + 4 * dpr,
    top + 28 * dpr,
  );
  ctx.restore();
}

const minutes = (_u: uPlot, ticks: number[]) => ticks.map((t) => `${+(t / 60).toFixed(2)}`);
/** Tick steps in seconds that read as whole minutes (or round fractions of one) on a minute axis. */
const MINUTE_STEPS = [
  6, 15, 30, 60, 120, 300, 600, 900, 1200, 1800, 3600, 7200, 10800, 21600, 43200, 86400, 172800,
  604800,
];

/** Tick labels with as many decimals as the step between ticks needs (no two alike). */
const stepDecimals = (_u: uPlot, ticks: number[]) => {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : 1;
  // the fewest decimals that write the step exactly (0.0005 → 4, 2.5 → 1)
  let d = 0;
  while (d < 8 && Math.abs(step * 10 ** d - Math.round(step * 10 ** d)) > 1e-6 * step * 10 ** d)
    d++;
  return ticks.map((t) => t.toFixed(d));
};

/** The hover legend's x entry on a minute axis: the time in minutes, as the axis reads. */
const MINUTE_LEGEND: uPlot.Series = {
  label: 'time (min)',
  value: (_u, v) => (v === null ? '—' : `${(v / 60).toFixed(2)} min`),
};

/** Follow the container's width (the page may be resized). */
function fit(u: uPlot, el: HTMLElement, height: number): void {
  const ro = new ResizeObserver(() => {
    const w = Math.max(320, Math.floor(el.clientWidth));
    if (Math.abs(w - u.width) > 2) u.setSize({ width: w, height });
  });
  ro.observe(el);
}

function widthOf(el: HTMLElement): number {
  return Math.max(320, Math.floor(el.clientWidth || 800));
}

export interface LogChart {
  setWindow(startS: number, endS: number): void;
  destroy(): void;
}

/**
 * The whole log, level against time from its start, with the drain window shaded. With
 * `onDrag`, dragging across the chart proposes a new window (the form fields follow).
 */
export function logChart(
  el: HTMLElement,
  timeS: ArrayLike<number>,
  levelM: ArrayLike<number>,
  win: { startS: number; endS: number } | null,
  onDrag?: (startS: number, endS: number) => void,
): LogChart {
  const drawn = decimate(timeS, levelM, Math.max(1200, widthOf(el) * 2));
  let current = win;
  const height = 300;
  const opts: uPlot.Options = {
    width: widthOf(el),
    height,
    scales: { x: { time: false } },
    legend: { show: true },
    cursor: { drag: { x: false, y: false, setScale: false } },
    axes: [
      axis('time from the start of the log (min)', { values: minutes, incrs: MINUTE_STEPS }),
      axis('level above the sensor zero (m)'),
    ],
    series: [
      MINUTE_LEGEND,
      {
        label: 'level (m)',
        stroke: COLOURS.level,
        width: 1.5,
        value: (_u, v) => (v === null ? '—' : `${v.toFixed(3)} m`),
      },
    ],
    hooks: {
      drawClear: [
        (u) => {
          if (!current) return;
          const x0 = u.valToPos(current.startS, 'x', true);
          const x1 = u.valToPos(current.endS, 'x', true);
          const { top, height: h } = u.bbox;
          const ctx = u.ctx;
          ctx.save();
          ctx.fillStyle = COLOURS.windowFill;
          ctx.fillRect(x0, top, x1 - x0, h);
          ctx.strokeStyle = COLOURS.windowEdge;
          ctx.lineWidth = 2;
          ctx.beginPath();
          ctx.moveTo(x0, top);
          ctx.lineTo(x0, top + h);
          ctx.moveTo(x1, top);
          ctx.lineTo(x1, top + h);
          ctx.stroke();
          ctx.restore();
        },
      ],
    },
  };
  const u = new uPlot(opts, [drawn.x, drawn.y] as uPlot.AlignedData, el);
  fit(u, el, height);
  if (onDrag)
    dragWindow(
      u,
      () => current,
      (w) => {
        current = w;
        u.redraw(false, false);
      },
      (w) => onDrag(Math.max(w.startS, timeS[0]), Math.min(w.endS, timeS[timeS.length - 1])),
    );
  return {
    setWindow(startS, endS) {
      current = { startS, endS };
      u.redraw(false, false);
    },
    destroy: () => u.destroy(),
  };
}

/**
 * Dragging on the plot: near an edge of the window moves that edge, elsewhere draws a new window.
 * Pointer events of our own (not uPlot's select), so edges can be grabbed and touch works too.
 */
function dragWindow(
  u: uPlot,
  get: () => { startS: number; endS: number } | null,
  live: (w: { startS: number; endS: number }) => void,
  done: (w: { startS: number; endS: number }) => void,
): void {
  const over = u.over;
  let mode: 'start' | 'end' | 'new' | null = null;
  let anchor = 0;
  const xAt = (e: PointerEvent) => u.posToVal(e.clientX - over.getBoundingClientRect().left, 'x');
  const edgeAt = (e: PointerEvent): 'start' | 'end' | null => {
    const w = get();
    if (!w) return null;
    const px = e.clientX - over.getBoundingClientRect().left;
    if (Math.abs(px - u.valToPos(w.startS, 'x')) < 7) return 'start';
    if (Math.abs(px - u.valToPos(w.endS, 'x')) < 7) return 'end';
    return null;
  };
  over.addEventListener('pointerdown', (e) => {
    if (e.button !== 0) return;
    mode = edgeAt(e) ?? 'new';
    anchor = xAt(e);
    over.setPointerCapture(e.pointerId);
    e.preventDefault();
  });
  over.addEventListener('pointermove', (e) => {
    if (!mode) {
      over.classList.toggle('at-edge', edgeAt(e) !== null);
      return;
    }
    const x = xAt(e);
    const w = get() ?? { startS: x, endS: x };
    if (mode === 'start') live({ startS: Math.min(x, w.endS - 1), endS: w.endS });
    else if (mode === 'end') live({ startS: w.startS, endS: Math.max(x, w.startS + 1) });
    else live({ startS: Math.min(anchor, x), endS: Math.max(anchor, x) });
  });
  const finish = (e: PointerEvent) => {
    if (!mode) return;
    const moved = Math.abs(u.valToPos(xAt(e), 'x') - u.valToPos(anchor, 'x')) >= 4;
    const wasNew = mode === 'new';
    mode = null;
    const w = get();
    if (w && (moved || !wasNew) && w.endS > w.startS) done(w);
  };
  over.addEventListener('pointerup', finish);
  over.addEventListener('pointercancel', finish);
}

export interface WindowPlot {
  offsetS: number;
  timeS: number[];
  observedM: number[];
  fittedM: number[];
}

/** Readings and the fitted curve over the window, against time from the log's start. */
export function fitChart(
  el: HTMLElement,
  w: WindowPlot,
  xLabel = 'time from the start of the log (min)',
): uPlot {
  const x = w.timeS.map((t) => t + w.offsetS);
  const u = new uPlot(
    {
      width: widthOf(el),
      height: 320,
      scales: { x: { time: false } },
      axes: [
        axis(xLabel, { values: minutes, incrs: MINUTE_STEPS }),
        axis('level above the sensor zero (m)'),
      ],
      series: [
        MINUTE_LEGEND,
        // the curve first: uPlot draws in series order, so the readings land on top of it
        // a wide curve under small, half-clear dots: the curve shows through where they crowd
        {
          label: 'fitted drain curve (m)',
          stroke: COLOURS.fitted,
          width: 5,
          points: { show: false },
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(4)} m`),
        },
        {
          label: 'readings (m)',
          stroke: 'rgba(47, 95, 138, 0.55)',
          width: 0,
          points: {
            show: true,
            size: 2.5,
            stroke: 'rgba(47, 95, 138, 0.55)',
            fill: 'rgba(47, 95, 138, 0.55)',
          },
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(4)} m`),
        },
      ],
    },
    [x, w.fittedM, w.observedM] as uPlot.AlignedData,
    el,
  );
  fit(u, el, 320);
  return u;
}

/** Residuals (reading − fitted) in mm, with ±2 RMS as a shaded band: a wander shows at once. */
export function residualChart(el: HTMLElement, w: WindowPlot, rmseM: number | null): uPlot {
  const x = w.timeS.map((t) => t + w.offsetS);
  const r = w.observedM.map((o, i) => (o - w.fittedM[i]) * 1000);
  const s = (rmseM ?? 0) * 1000 * 2;
  const hi = x.map(() => s);
  const lo = x.map(() => -s);
  const zero = x.map(() => 0);
  const u = new uPlot(
    {
      width: widthOf(el),
      height: 220,
      scales: { x: { time: false } },
      axes: [
        axis('time from the start of the log (min)', { values: minutes, incrs: MINUTE_STEPS }),
        axis('reading − fitted (mm)'),
      ],
      bands: [{ series: [2, 3], fill: COLOURS.band }],
      series: [
        MINUTE_LEGEND,
        {
          label: 'residual (mm)',
          stroke: COLOURS.residual,
          width: 0,
          points: { show: true, size: 3, stroke: COLOURS.residual, fill: COLOURS.residual },
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(2)} mm`),
        },
        {
          label: '+2 × RMS (mm)',
          stroke: 'rgba(93,74,140,0.35)',
          width: 1,
          points: { show: false },
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(2)} mm`),
        },
        {
          label: '−2 × RMS (mm)',
          stroke: 'rgba(93,74,140,0.35)',
          width: 1,
          points: { show: false },
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(2)} mm`),
        },
        { label: 'zero', stroke: COLOURS.axis, width: 1, points: { show: false } },
      ],
    },
    [x, r, hi, lo, zero] as uPlot.AlignedData,
    el,
  );
  fit(u, el, 220);
  return u;
}

/** Vertical whiskers from lo[i] to hi[i] at each x, drawn over the series of index `si`. */
function whiskers(
  lo: (number | null)[],
  hi: (number | null)[],
  colourOf: (i: number) => string,
): uPlot.Plugin {
  return {
    hooks: {
      draw: [
        (u) => {
          const ctx = u.ctx;
          const xs = u.data[0];
          ctx.save();
          ctx.lineWidth = 1.5;
          for (let i = 0; i < xs.length; i++) {
            const a = lo[i],
              b = hi[i];
            if (a === null || b === null) continue;
            const x = u.valToPos(xs[i], 'x', true);
            const y0 = u.valToPos(a, 'y', true);
            const y1 = u.valToPos(b, 'y', true);
            ctx.strokeStyle = colourOf(i);
            ctx.beginPath();
            ctx.moveTo(x, y0);
            ctx.lineTo(x, y1);
            ctx.moveTo(x - 4, y0);
            ctx.lineTo(x + 4, y0);
            ctx.moveTo(x - 4, y1);
            ctx.lineTo(x + 4, y1);
            ctx.stroke();
          }
          ctx.restore();
        },
      ],
    },
  };
}

/** Cd per head band: does the coefficient change with head? Bars are ±2 standard uncertainties. */
export function headBandChart(
  el: HTMLElement,
  bands: {
    headFromM: number;
    headToM: number;
    dischargeCoefficient: number;
    standardUncertainty: number;
  }[],
): uPlot {
  const rows = bands
    .map((b) => ({
      h: (b.headFromM + b.headToM) / 2,
      cd: b.dischargeCoefficient,
      u: b.standardUncertainty,
    }))
    .sort((a, b) => a.h - b.h);
  const x = rows.map((r) => r.h);
  const cd = rows.map((r) => r.cd);
  const lo = rows.map((r) => r.cd - 2 * r.u);
  const hi = rows.map((r) => r.cd + 2 * r.u);
  const all = [...lo, ...hi].filter(Number.isFinite);
  const pad = (Math.max(...all) - Math.min(...all)) * 0.1 || 0.01;
  const xpad = rows.length > 1 ? (x[x.length - 1] - x[0]) * 0.1 : 0.1;
  const u = new uPlot(
    {
      width: widthOf(el),
      height: 240,
      scales: {
        x: { time: false, range: [x[0] - xpad, x[x.length - 1] + xpad] },
        y: { range: [Math.min(...all) - pad, Math.max(...all) + pad] },
      },
      axes: [
        axis('head over the outlet, middle of the band (m)'),
        axis('discharge coefficient Cd (–)', { values: stepDecimals }),
      ],
      series: [
        { label: 'head (m)', value: (_u, v) => (v === null ? '—' : `${v.toFixed(3)} m`) },
        {
          label: 'Cd in the band',
          stroke: COLOURS.fitted,
          width: 0,
          points: { show: true, size: 8, stroke: COLOURS.fitted, fill: COLOURS.fitted },
          value: (_u, v) => (v === null ? '—' : v.toFixed(4)),
        },
      ],
      plugins: [whiskers(lo, hi, () => COLOURS.fitted)],
    },
    [x, cd] as uPlot.AlignedData,
    el,
  );
  fit(u, el, 240);
  return u;
}

export interface HistoryPoint {
  atS: number; // epoch seconds
  cd: number;
  expanded: number;
  status: 'draft' | 'approved' | 'rejected';
}

/**
 * Cd of one outlet over time, each test a point with its expanded uncertainty as a bar; approved
 * and draft fits in their own series; maintenance as vertical marks; the action threshold and a
 * baseline as horizontal lines when the service gives them.
 */
export function historyChart(
  el: HTMLElement,
  points: HistoryPoint[],
  events: { atS: number; kind: string }[],
  lines: { threshold: number | null; baseline: number | null },
): uPlot {
  const pts = [...points].sort((a, b) => a.atS - b.atS);
  const x = pts.map((p) => p.atS);
  const approved = pts.map((p) => (p.status === 'approved' ? p.cd : null));
  const draft = pts.map((p) => (p.status === 'draft' ? p.cd : null));
  const lo = pts.map((p) => (p.status === 'rejected' ? null : p.cd - p.expanded));
  const hi = pts.map((p) => (p.status === 'rejected' ? null : p.cd + p.expanded));
  const ys = [...lo, ...hi, lines.threshold, lines.baseline].filter(
    (v): v is number => v !== null && Number.isFinite(v),
  );
  const ymin = Math.min(...ys),
    ymax = Math.max(...ys);
  const pad = (ymax - ymin) * 0.15 || 0.02;
  const span = x.length > 1 ? x[x.length - 1] - x[0] : 86400 * 30;
  const xr: [number, number] = [
    Math.min(x[0], ...events.map((e) => e.atS)) - span * 0.08,
    Math.max(x[x.length - 1], ...events.map((e) => e.atS)) + span * 0.08,
  ];
  // today is shown when it lies within a fifth of the span past the last test (else it squeezes the tests)
  const nowS = Date.now() / 1000;
  if (nowS > xr[1] && nowS - x[x.length - 1] < span * 0.2) xr[1] = nowS + span * 0.04;
  const overlay: uPlot.Plugin = {
    hooks: {
      drawClear: [
        (u) => {
          const ctx = u.ctx;
          const { left, top, width, height } = u.bbox;
          ctx.save();
          ctx.setLineDash([6, 4]);
          ctx.lineWidth = 1.5;
          for (const e of events) {
            const px = u.valToPos(e.atS, 'x', true);
            ctx.strokeStyle = COLOURS.maintenance;
            ctx.beginPath();
            ctx.moveTo(px, top);
            ctx.lineTo(px, top + height);
            ctx.stroke();
            ctx.fillStyle = COLOURS.maintenance;
            ctx.font = `${11 * devicePixelRatio}px system-ui, sans-serif`;
            ctx.fillText(e.kind, px + 4, top + 14 * devicePixelRatio);
          }
          for (const [v, colour, label] of [
            [lines.threshold, COLOURS.threshold, 'action threshold'],
            [lines.baseline, COLOURS.approved, 'baseline'],
          ] as const) {
            if (v === null) continue;
            const py = u.valToPos(v, 'y', true);
            ctx.strokeStyle = colour;
            ctx.beginPath();
            ctx.moveTo(left, py);
            ctx.lineTo(left + width, py);
            ctx.stroke();
            ctx.fillStyle = colour;
            ctx.font = `${11 * devicePixelRatio}px system-ui, sans-serif`;
            ctx.fillText(`${label} ${v.toFixed(3)}`, left + 6, py - 4);
          }
          ctx.restore();
          drawToday(u, Date.now() / 1000);
        },
      ],
    },
  };
  const u = new uPlot(
    {
      width: widthOf(el),
      height: 260,
      scales: { x: { time: true, range: xr }, y: { range: [ymin - pad, ymax + pad] } },
      tzDate: utcDate,
      axes: [
        axis('date of the test (UTC)', { values: isoDateTicks, space: ISO_DATE_SPACE }),
        axis('discharge coefficient Cd (–)'),
      ],
      series: [
        { label: 'date of the test', value: isoDateValue },
        {
          label: 'draft (not yet reviewed)',
          stroke: COLOURS.draft,
          width: 0,
          points: { show: true, size: 9, stroke: COLOURS.draft, fill: '#fff' },
          value: (_u, v) => (v === null ? '—' : v.toFixed(4)),
        },
        {
          label: 'approved',
          stroke: COLOURS.approved,
          width: 0,
          points: { show: true, size: 9, stroke: COLOURS.approved, fill: COLOURS.approved },
          value: (_u, v) => (v === null ? '—' : v.toFixed(4)),
        },
      ],
      plugins: [
        overlay,
        whiskers(lo, hi, (i) => (pts[i].status === 'approved' ? COLOURS.approved : COLOURS.draft)),
      ],
    },
    // drafts first, so an approved point on the same day is drawn on top
    [x, draft, approved] as uPlot.AlignedData,
    el,
  );
  fit(u, el, 260);
  return u;
}
