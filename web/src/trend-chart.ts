/**
 * One outlet's trend (GET /api/outlets/:id/trend): each approved test's Cd·a (or Cd) with its
 * ±2u bar, each epoch's weighted lines with their 95 % bands, the epoch's baseline and action
 * threshold, maintenance that started an epoch, flagged steps, the forecast date the threshold
 * is crossed with its interval, the 95 % prediction band of a new test past the last one, and
 * today. uPlot draws the points and the axes; the lines, bands and markers are drawn on its
 * canvas (one overlay). Lines are drawn per segment (server/core/trend/outlet.ts): they never
 * join across a maintenance, nor across a flagged step (each side its own line, or none with
 * fewer than 3 tests). Dates are ISO 8601, UTC.
 */
import uPlot from 'uplot';
import {
  COLOURS,
  drawToday,
  ISO_DATE_SPACE,
  isoDateTicks,
  isoDateValue,
  utcDate,
} from './charts.js';

// The API's shapes, defined once in server/jobs/trend-views.ts (type-only: erased by the bundler)
export type {
  PointView as TrendPoint,
  LineView as TrendLine,
  EpochView as TrendEpoch,
  TrendView as FullTrend,
} from '../../server/jobs/trend-views.js';
import type {
  PointView as TrendPoint,
  EpochView as TrendEpoch,
  TrendView as FullTrend,
} from '../../server/jobs/trend-views.js';

export type TrendQuantity = 'area' | 'cd';

const TREND = {
  line: '#1e5b8a',
  band: 'rgba(30, 91, 138, 0.15)',
  baseline: COLOURS.approved,
  threshold: COLOURS.threshold,
  forecast: 'rgba(163, 58, 58, 0.12)',
  newTest: 'rgba(30, 91, 138, 0.55)',
  step: '#b3261e',
  point: '#1d2a33',
};

const toXY = (b: { atMs: number; value: number; lower: number; upper: number }[], k: number) =>
  b.map((p) => ({ x: p.atMs / 1000, v: p.value * k, lo: p.lower * k, hi: p.upper * k }));

/** Cd·a is shown in mm² (m² reads badly); Cd has no unit. */
function pick(q: TrendQuantity) {
  const k = q === 'area' ? 1e6 : 1;
  return {
    value: (p: TrendPoint) => (q === 'area' ? p.effectiveAreaM2 : p.dischargeCoefficient) * k,
    u: (p: TrendPoint) => (q === 'area' ? p.effectiveAreaU : p.dischargeCoefficientU) * k,
    /** One band per segment; an older answer without segments: the epoch's band. */
    segmentBands: (e: TrendEpoch) =>
      e.segments
        ? e.segments.map((g) => toXY(q === 'area' ? g.areaBand : g.cdBand, k))
        : [toXY(q === 'area' ? e.areaBand : e.cdBand, k)],
    /** The prediction band of a new test (Cd·a only: the service forecasts Cd·a). */
    newTestBand: (e: TrendEpoch) => (q === 'area' ? toXY(e.areaNewTestBand ?? [], k) : []),
    line: (e: TrendEpoch) => (q === 'area' ? e.area : e.cd),
    threshold: (e: TrendEpoch) => (q === 'area' ? e.thresholdM2 : e.thresholdCd),
    scale: k,
    label: q === 'area' ? 'effective area Cd·a (mm²)' : 'discharge coefficient Cd (–)',
    fmt: (v: number) => (q === 'area' ? `${v.toFixed(1)} mm²` : v.toFixed(4)),
  };
}

export function trendChart(el: HTMLElement, t: FullTrend, q: TrendQuantity): uPlot {
  const P = pick(q);
  const pts = t.epochs
    .flatMap((e) => e.series.map((p) => ({ p, e })))
    .sort((a, b) => a.p.testedAtMs - b.p.testedAtMs);
  const x = pts.map(({ p }) => p.testedAtMs / 1000);
  const y = pts.map(({ p }) => P.value(p));
  const lo = pts.map(({ p }) => P.value(p) - 2 * P.u(p));
  const hi = pts.map(({ p }) => P.value(p) + 2 * P.u(p));
  const steps = new Set(
    t.epochs.filter((e) => e.step?.flagged && e.step.fitId !== null).map((e) => e.step!.fitId!),
  );
  const starts = t.epochs
    .filter((e) => e.startedBy)
    .map((e) => ({ x: e.startedBy!.atMs / 1000, kind: e.startedBy!.kind }));
  const cur = t.epochs.find((e) => e.current) ?? null;
  const fc = cur?.forecast ?? null;
  const lastX = x.length ? x[x.length - 1] : t.nowMs / 1000;
  // the forecast is drawn when it falls within five years of the last test, else only told in words
  const horizon = lastX + 5 * 365.25 * 86400;
  const fcX = fc?.crossingMs && fc.crossingMs / 1000 < horizon ? fc.crossingMs / 1000 : null;
  const fcHi = fc?.upperMs ? Math.min(fc.upperMs / 1000, horizon) : fcX;
  const xsAll = [
    ...x,
    ...starts.map((s) => s.x),
    t.nowMs / 1000,
    ...(fcX ? [fcX, fcHi ?? fcX] : []),
  ];
  const x0 = Math.min(...xsAll);
  const x1 = Math.max(...xsAll);
  const pad = (x1 - x0) * 0.05 || 86400 * 30;
  const ys = [
    ...lo,
    ...hi,
    ...t.epochs.flatMap((e) =>
      P.segmentBands(e)
        .flat()
        .flatMap((b) => [b.lo, b.hi]),
    ),
    ...t.epochs.flatMap((e) =>
      P.newTestBand(e)
        .filter((b) => b.x <= t.nowMs / 1000 + 86400)
        .flatMap((b) => [b.lo, b.hi]),
    ),
    ...t.epochs.map((e) => (P.threshold(e) ?? NaN) * P.scale),
  ].filter(Number.isFinite);
  const ymin = Math.min(...ys);
  const ymax = Math.max(...ys);
  const ypad = (ymax - ymin) * 0.12 || 0.05 * Math.abs(ymax || 1);

  const overlay: uPlot.Plugin = {
    hooks: {
      drawClear: [
        (u) => {
          const ctx = u.ctx;
          const { left, top, width, height } = u.bbox;
          const px = (v: number) => u.valToPos(v, 'x', true);
          const py = (v: number) => u.valToPos(v, 'y', true);
          const dpr = devicePixelRatio;
          ctx.save();
          ctx.beginPath();
          ctx.rect(left, top, width, height);
          ctx.clip();
          ctx.font = `${11 * dpr}px system-ui, sans-serif`;
          // forecast interval, shaded, and the crossing date
          if (fcX !== null) {
            const a = fc?.lowerMs ? px(fc.lowerMs / 1000) : px(fcX);
            const b = px(fcHi ?? fcX);
            ctx.fillStyle = TREND.forecast;
            ctx.fillRect(Math.min(a, b), top, Math.max(Math.abs(b - a), 2), height);
            ctx.strokeStyle = TREND.threshold;
            ctx.setLineDash([2, 3]);
            ctx.lineWidth = 1.5 * dpr;
            ctx.beginPath();
            ctx.moveTo(px(fcX), top);
            ctx.lineTo(px(fcX), top + height);
            ctx.stroke();
            ctx.setLineDash([]);
            ctx.fillStyle = TREND.threshold;
            const label = `forecast crossing ${new Date(fcX * 1000).toISOString().slice(0, 10)}`;
            const tw = ctx.measureText(label).width;
            // left of the line when there is no room to its right; low in the plot, clear of the baseline
            const lx =
              px(fcX) + 6 * dpr + tw > left + width ? px(fcX) - 6 * dpr - tw : px(fcX) + 6 * dpr;
            ctx.fillText(label, lx, top + height - 10 * dpr);
          }
          t.epochs.forEach((e, i) => {
            // the prediction band of a new test, dashed edges, from the last test on
            const nb = P.newTestBand(e);
            if (nb.length > 1) {
              ctx.strokeStyle = TREND.newTest;
              ctx.lineWidth = 1 * dpr;
              ctx.setLineDash([5 * dpr, 3 * dpr]);
              for (const edge of ['lo', 'hi'] as const) {
                ctx.beginPath();
                nb.forEach((b, k) =>
                  k ? ctx.lineTo(px(b.x), py(b[edge])) : ctx.moveTo(px(b.x), py(b[edge])),
                );
                ctx.stroke();
              }
              ctx.setLineDash([]);
            }
            const endX =
              i + 1 < t.epochs.length && t.epochs[i + 1].startMs
                ? t.epochs[i + 1].startMs! / 1000
                : (fcX ?? Math.max(lastX, t.nowMs / 1000));
            const startX = e.startMs ? e.startMs / 1000 : (e.series[0]?.testedAtMs ?? 0) / 1000;
            for (const band of P.segmentBands(e)) {
              if (band.length < 2) continue;
              ctx.fillStyle = TREND.band;
              ctx.beginPath();
              band.forEach((b, k) =>
                k ? ctx.lineTo(px(b.x), py(b.hi)) : ctx.moveTo(px(b.x), py(b.hi)),
              );
              for (let k = band.length - 1; k >= 0; k--) ctx.lineTo(px(band[k].x), py(band[k].lo));
              ctx.closePath();
              ctx.fill();
              ctx.strokeStyle = TREND.line;
              ctx.lineWidth = 2 * dpr;
              ctx.beginPath();
              band.forEach((b, k) =>
                k ? ctx.lineTo(px(b.x), py(b.v)) : ctx.moveTo(px(b.x), py(b.v)),
              );
              ctx.stroke();
            }
            const line = P.line(e);
            const base = line ? line.baselineValue * P.scale : null;
            const thr = P.threshold(e);
            for (const [v, colour, label, dash] of [
              [base, TREND.baseline, 'baseline', [8, 4]],
              [thr === null ? null : thr * P.scale, TREND.threshold, 'action threshold', [3, 3]],
            ] as const) {
              if (v === null || !Number.isFinite(v)) continue;
              ctx.strokeStyle = colour;
              ctx.lineWidth = 1.5 * dpr;
              ctx.setLineDash(dash.map((d) => d * dpr));
              ctx.beginPath();
              ctx.moveTo(px(startX), py(v));
              ctx.lineTo(px(endX), py(v));
              ctx.stroke();
              ctx.setLineDash([]);
              if (e.current) {
                ctx.fillStyle = colour;
                ctx.fillText(
                  `${label} ${P.fmt(v)}`,
                  Math.max(px(startX), left) + 6 * dpr,
                  py(v) + (label === 'baseline' ? -5 : 14) * dpr,
                );
              }
            }
          });
          // maintenance that started an epoch
          ctx.strokeStyle = COLOURS.maintenance;
          ctx.fillStyle = COLOURS.maintenance;
          ctx.lineWidth = 1.5 * dpr;
          for (const s of starts) {
            ctx.setLineDash([6 * dpr, 4 * dpr]);
            ctx.beginPath();
            ctx.moveTo(px(s.x), top);
            ctx.lineTo(px(s.x), top + height);
            ctx.stroke();
            ctx.setLineDash([]);
            ctx.fillText(s.kind, px(s.x) + 4 * dpr, top + 14 * dpr);
          }
          ctx.restore();
          drawToday(u, t.nowMs / 1000);
        },
      ],
      draw: [
        (u) => {
          const ctx = u.ctx;
          const dpr = devicePixelRatio;
          ctx.save();
          ctx.lineWidth = 1.5 * dpr;
          for (let i = 0; i < x.length; i++) {
            const cx = u.valToPos(x[i], 'x', true);
            ctx.strokeStyle = TREND.point;
            ctx.beginPath();
            ctx.moveTo(cx, u.valToPos(lo[i], 'y', true));
            ctx.lineTo(cx, u.valToPos(hi[i], 'y', true));
            ctx.moveTo(cx - 4 * dpr, u.valToPos(lo[i], 'y', true));
            ctx.lineTo(cx + 4 * dpr, u.valToPos(lo[i], 'y', true));
            ctx.moveTo(cx - 4 * dpr, u.valToPos(hi[i], 'y', true));
            ctx.lineTo(cx + 4 * dpr, u.valToPos(hi[i], 'y', true));
            ctx.stroke();
            if (steps.has(pts[i].p.fitId)) {
              // a flagged step: a red triangle above the bar
              const ty = u.valToPos(hi[i], 'y', true) - 6 * dpr;
              ctx.fillStyle = TREND.step;
              ctx.beginPath();
              ctx.moveTo(cx, ty);
              ctx.lineTo(cx - 6 * dpr, ty - 10 * dpr);
              ctx.lineTo(cx + 6 * dpr, ty - 10 * dpr);
              ctx.closePath();
              ctx.fill();
              ctx.fillText('step', cx + 8 * dpr, ty - 2 * dpr);
            }
          }
          ctx.restore();
        },
      ],
    },
  };
  const width = Math.max(320, Math.floor(el.clientWidth || 800));
  const u = new uPlot(
    {
      width,
      height: 300,
      scales: {
        x: { time: true, range: [x0 - pad, x1 + pad] },
        y: { range: [ymin - ypad, ymax + ypad] },
      },
      tzDate: utcDate,
      axes: [
        {
          label: 'date of the test (UTC)',
          values: isoDateTicks,
          space: ISO_DATE_SPACE,
          stroke: COLOURS.axis,
          grid: { stroke: COLOURS.grid, width: 1 },
          ticks: { stroke: COLOURS.grid, width: 1 },
          font: '12px system-ui, sans-serif',
          labelFont: '12px system-ui, sans-serif',
        },
        {
          label: P.label,
          stroke: COLOURS.axis,
          grid: { stroke: COLOURS.grid, width: 1 },
          ticks: { stroke: COLOURS.grid, width: 1 },
          font: '12px system-ui, sans-serif',
          labelFont: '12px system-ui, sans-serif',
          size: 64,
        },
      ],
      series: [
        { label: 'date of the test', value: isoDateValue },
        {
          label: P.label,
          stroke: TREND.point,
          width: 0,
          points: { show: true, size: 8, stroke: TREND.point, fill: '#fff' },
          value: (_u, v) => (v === null ? '—' : P.fmt(v)),
        },
      ],
      plugins: [overlay],
    },
    [x, y] as uPlot.AlignedData,
    el,
  );
  new ResizeObserver(() => {
    const w = Math.max(320, Math.floor(el.clientWidth));
    if (Math.abs(w - u.width) > 2) u.setSize({ width: w, height: 300 });
  }).observe(el);
  return u;
}
