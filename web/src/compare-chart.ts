/**
 * Tests side by side as one uPlot chart: time (min) from the reference head against the head above
 * the outlet, each test's readings as dots and its fitted curve as a line, one colour per test.
 * uPlot wants one ascending x array: every test's heads are merged into it, each series `null`
 * where it has no point (the curves span those gaps).
 */
import uPlot from 'uplot';
import type { TestComparison } from './api.js';
import { COLOURS } from './charts.js';
import { unitOf } from './format.js';

/** One colour per test, distinct in print and for common colour-vision deficiencies (Okabe–Ito). */
const TEST_COLOURS = [
  '#0072b2',
  '#d55e00',
  '#009e73',
  '#cc79a7',
  '#e69f00',
  '#56b4e9',
  '#000000',
  '#999999',
];

const axis = (label: string): uPlot.Axis => ({
  label,
  stroke: COLOURS.axis,
  grid: { stroke: COLOURS.grid, width: 1 },
  ticks: { stroke: COLOURS.grid, width: 1 },
  font: '12px system-ui, sans-serif',
  labelFont: '12px system-ui, sans-serif',
});

export function comparisonChart(el: HTMLElement, c: TestComparison): uPlot | null {
  const length = unitOf('length');
  const drawn = c.tests.filter((t) => t.curve);
  if (!drawn.length) return null;
  // the merged x axis: head in the person's unit, ascending
  const xs = [
    ...new Set(
      drawn.flatMap((t) =>
        [...t.curve!.headM, ...t.curve!.fittedHeadM].map((h) => h * length.perSi),
      ),
    ),
  ].sort((a, b) => a - b);
  const at = new Map(xs.map((x, i) => [x, i]));
  const column = (heads: number[], elapsedS: number[]) => {
    const y: (number | null)[] = new Array(xs.length).fill(null);
    heads.forEach((h, i) => {
      y[at.get(h * length.perSi)!] = elapsedS[i] / 60;
    });
    return y;
  };
  const series: uPlot.Series[] = [
    { label: `head (${length.symbol})`, value: (_u, v) => (v === null ? '—' : v.toFixed(3)) },
  ];
  const data: (number | null)[][] = [xs];
  drawn.forEach((t, i) => {
    const colour = TEST_COLOURS[i % TEST_COLOURS.length];
    const minutes = (_u: uPlot, v: number | null) => (v === null ? '—' : `${v.toFixed(2)} min`);
    series.push(
      {
        label: `${t.label} readings`,
        stroke: colour,
        width: 0,
        points: { show: true, size: 3, stroke: colour, fill: colour },
        value: minutes,
      },
      {
        label: `${t.label} fitted`,
        stroke: colour,
        width: 2,
        spanGaps: true,
        points: { show: false },
        value: minutes,
      },
    );
    data.push(
      column(t.curve!.headM, t.curve!.elapsedS),
      column(t.curve!.fittedHeadM, t.curve!.elapsedS),
    );
  });
  const width = Math.max(320, Math.floor(el.clientWidth || 800));
  const u = new uPlot(
    {
      width,
      height: 340,
      scales: { x: { time: false } },
      axes: [
        axis(`head above the outlet (${length.symbol})`),
        axis(
          c.referenceHeadM === null
            ? 'time from the start of each window (min)'
            : 'time from the reference head (min)',
        ),
      ],
      series,
    },
    data as uPlot.AlignedData,
    el,
  );
  const ro = new ResizeObserver(() => {
    const w = Math.max(320, Math.floor(el.clientWidth));
    if (Math.abs(w - u.width) > 2) u.setSize({ width: w, height: 340 });
  });
  ro.observe(el);
  return u;
}
