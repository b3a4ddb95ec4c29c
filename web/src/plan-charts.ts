/**
 * Charts of the planner and the live test (uPlot, as the rest of the workbench): the predicted
 * level and outflow against time on two axes; the live readings with the fitted curve and the
 * opening; the live fit's u_r against time with the target as a line.
 */
import uPlot from 'uplot';
import { COLOURS } from './charts.js';
import { decimate } from './decimate.js';

const axis = (label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis => ({
  label,
  stroke: COLOURS.axis,
  grid: { stroke: COLOURS.grid, width: 1 },
  ticks: { stroke: COLOURS.grid, width: 1 },
  font: '12px system-ui, sans-serif',
  labelFont: '12px system-ui, sans-serif',
  ...extra,
});
const minutes = (_u: uPlot, ticks: number[]) => ticks.map((t) => `${+(t / 60).toFixed(2)}`);
const widthOf = (el: HTMLElement) => Math.max(320, Math.floor(el.clientWidth || 800));

function follow(u: uPlot, el: HTMLElement, height: number): void {
  const ro = new ResizeObserver(() => {
    const w = widthOf(el);
    if (Math.abs(w - u.width) > 2) u.setSize({ width: w, height });
  });
  ro.observe(el);
}

/** A vertical line at x, drawn after the series. */
function marker(getX: () => number | null, colour: string, label: string): (u: uPlot) => void {
  return (u) => {
    const x = getX();
    if (x === null) return;
    const px = u.valToPos(x, 'x', true);
    const { top, height } = u.bbox;
    const ctx = u.ctx;
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.setLineDash([6, 4]);
    ctx.lineWidth = 2;
    ctx.beginPath();
    ctx.moveTo(px, top);
    ctx.lineTo(px, top + height);
    ctx.stroke();
    ctx.fillStyle = colour;
    ctx.font = '12px system-ui, sans-serif';
    ctx.fillText(label, px + 4, top + 14);
    ctx.restore();
  };
}

export function planChart(
  el: HTMLElement,
  curve: { timeS: number[]; levelM: number[]; outflowLS: number[] },
): uPlot {
  const height = 300;
  const u = new uPlot(
    {
      width: widthOf(el),
      height,
      scales: { x: { time: false }, m: {}, ls: {} },
      axes: [
        axis('time after the valve opens (min)', { values: minutes }),
        axis('level (m)', { scale: 'm' }),
        axis('outflow (L/s)', { scale: 'ls', side: 1, grid: { show: false } }),
      ],
      series: [
        {
          label: 'time (min)',
          value: (_u, v) => (v === null ? '—' : `${(v / 60).toFixed(2)} min`),
        },
        {
          label: 'predicted level (m)',
          scale: 'm',
          stroke: COLOURS.level,
          width: 2,
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(3)} m`),
        },
        {
          label: 'predicted outflow (L/s)',
          scale: 'ls',
          stroke: COLOURS.fitted,
          width: 2,
          dash: [8, 4],
          value: (_u, v) => (v === null ? '—' : `${v.toFixed(2)} L/s`),
        },
      ],
    },
    [curve.timeS, curve.levelM, curve.outflowLS],
    el,
  );
  follow(u, el, height);
  return u;
}

export interface LiveChart {
  update(
    readings: { timeS: number[]; levelM: number[] },
    fitted: { timeS: number[]; levelM: number[] } | null,
    openingS: number | null,
  ): void;
}

export function liveChart(el: HTMLElement): LiveChart {
  const height = 300;
  let opening: number | null = null;
  const u = new uPlot(
    {
      width: widthOf(el),
      height,
      scales: { x: { time: false } },
      axes: [
        axis('time from the start of the log (min)', { values: minutes }),
        axis('level above the sensor zero (m)'),
      ],
      series: [
        {
          label: 'time (min)',
          value: (_u, v) => (v === null ? '—' : `${(v / 60).toFixed(2)} min`),
        },
        { label: 'readings (m)', stroke: COLOURS.level, width: 1.5, spanGaps: true },
        { label: 'fitted (m)', stroke: COLOURS.fitted, width: 2, spanGaps: true },
      ],
      hooks: { draw: [marker(() => opening, COLOURS.windowEdge, 'valve opened')] },
    },
    [[], [], []],
    el,
  );
  follow(u, el, height);
  return {
    update(readings, fitted, openingS) {
      opening = openingS;
      const r = decimate(readings.timeS, readings.levelM, Math.max(1200, widthOf(el) * 2));
      // one x for both series: the readings' times and the fitted curve's, each with nulls where the other has points
      const points: [number, number | null, number | null][] = r.x.map((t, i) => [t, r.y[i], null]);
      if (fitted)
        for (let i = 0; i < fitted.timeS.length; i++)
          points.push([fitted.timeS[i], null, fitted.levelM[i]]);
      points.sort((a, b) => a[0] - b[0]);
      u.setData([
        points.map((p) => p[0]),
        points.map((p) => p[1]),
        points.map((p) => p[2]),
      ] as uPlot.AlignedData);
    },
  };
}

export interface NarrowingPoint {
  elapsedS: number;
  value: number | null;
  expandedUncertainty: number | null;
}

export interface NarrowingChart {
  update(
    points: NarrowingPoint[],
    target: { relative: number; coverageFactor: number } | null,
  ): void;
}

/**
 * The target's quantity (Cd or Cd·a) after each refit with its ±U band, narrowing as data come
 * in, and the target as two dashed lines at the latest value × (1 ± k·target).
 */
export function narrowingChart(el: HTMLElement, label: string, digits: number): NarrowingChart {
  const height = 240;
  const fmt = (_u: uPlot, v: number | null) => (v === null ? '—' : v.toPrecision(digits));
  const u = new uPlot(
    {
      width: widthOf(el),
      height,
      scales: { x: { time: false } },
      axes: [
        axis('time since the live test was opened (s)'),
        axis(label, { size: 70, values: (_u, t) => t.map((v) => v.toPrecision(digits)) }),
      ],
      series: [
        { label: 'since opening (s)', value: (_u, v) => (v === null ? '—' : `${v.toFixed(0)} s`) },
        { label, stroke: COLOURS.fitted, width: 2, points: { show: true, size: 5 }, value: fmt },
        { label: '+U', stroke: COLOURS.residual, width: 1, value: fmt },
        { label: '−U', stroke: COLOURS.residual, width: 1, value: fmt },
        { label: 'target +', stroke: COLOURS.approved, width: 2, dash: [6, 4], value: fmt },
        { label: 'target −', stroke: COLOURS.approved, width: 2, dash: [6, 4], value: fmt },
      ],
      bands: [{ series: [2, 3], fill: COLOURS.band }],
    },
    [[], [], [], [], [], []],
    el,
  );
  follow(u, el, height);
  return {
    update(points, target) {
      const last = [...points].reverse().find((p) => p.value !== null);
      const hi =
        last && target ? last.value! * (1 + target.coverageFactor * target.relative) : null;
      const lo =
        last && target ? last.value! * (1 - target.coverageFactor * target.relative) : null;
      u.setData([
        points.map((p) => p.elapsedS),
        points.map((p) => p.value),
        points.map((p) =>
          p.value === null || p.expandedUncertainty === null
            ? null
            : p.value + p.expandedUncertainty,
        ),
        points.map((p) =>
          p.value === null || p.expandedUncertainty === null
            ? null
            : p.value - p.expandedUncertainty,
        ),
        points.map(() => hi),
        points.map(() => lo),
      ] as uPlot.AlignedData);
    },
  };
}
