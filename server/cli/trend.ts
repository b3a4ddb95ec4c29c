/**
 * `efflux trend <outletId> [--json|--csv] [--as-of DATE]` and `efflux trend --fleet [--json]
 * [--site S] [--status WORD[,WORD]] [--as-of DATE]`: the same trend and fleet the service answers,
 * read from the same data folder (EFFLUX_DATA_DIR).
 */
import { InputError } from '../core/errors.js';
import {
  fleetStatus,
  historyCsv,
  outletTrendView,
  STATUS_WORDS,
  type FleetView,
  type TrendView,
} from '../jobs/trend.js';
import { NotFoundError, openStore } from '../store/index.js';
import { guarded } from './io.js';
import { outletByName, refusalsAsInput, sitesByPart } from './names.js';
import { storeLocation } from './serve-config.js';
import { clipText, countText } from '../core/format/words.js';
import { daysText } from '../core/format/duration.js';
import { toU } from '../core/format/digits.js';
import { uncertaintyText } from '../core/format/uncertainty.js';
import { displayUnit, type UnitSystem } from '../core/format/unit-system.js';
import { UNITS_HELP, unitsFrom } from './units-option.js';

const USAGE = `usage: efflux trend OUTLET [--site PART] [--json|--csv] [--as-of DATE] [--units si|us]
       efflux trend --fleet [--json] [--site PART] [--status WORD[,WORD…]] [--as-of DATE]
OUTLET is an outlet id, its tag, a vessel tag with one outlet (efflux trend FD-2), or VESSEL/OUTLET;
--site matches any part of a site's name, in any case, and says which sites it matched.
Reads the service's data folder (EFFLUX_DATA_DIR, default ./data). Status words: ${STATUS_WORDS.join(', ')}.
  ${UNITS_HELP}
`;

function option(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(`--${name}`);
  if (i >= 0) {
    const v = argv[i + 1];
    if (v === undefined || v.startsWith('--'))
      throw new InputError(`--${name} needs a value`, { field: name });
    return v;
  }
  return argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3);
}

const day = (ms: number | null) => (ms === null ? '—' : new Date(ms).toISOString().slice(0, 10));
/** Days to the threshold: whole days up to 90, then months or years (core/format/duration). */
const days = (d: number | null) => (d === null ? '—' : daysText(d));

/** A small picture of the Cd·a change against time: one column per test, threshold as '-'. */
export function asciiChart(view: TrendView, width = 60, height = 10): string[] {
  const pts = view.epochs.flatMap((e) =>
    e.series.map((p) => ({ x: p.testedAtMs, y: p.changePct, epoch: e.index })),
  );
  if (pts.length < 2) return [];
  const pct = view.threshold.pct;
  const ys = [...pts.map((p) => p.y), pct, 0];
  const lo = Math.min(...ys),
    hi = Math.max(...ys);
  const x0 = pts[0].x,
    x1 = pts[pts.length - 1].x;
  const grid = Array.from({ length: height }, () => Array<string>(width).fill(' '));
  const row = (y: number) => Math.round(((hi - y) / (hi - lo || 1)) * (height - 1));
  for (let c = 0; c < width; c++) grid[row(pct)][c] = '-';
  for (const p of pts)
    grid[row(p.y)][Math.round(((p.x - x0) / (x1 - x0 || 1)) * (width - 1))] =
      p.epoch % 2 ? 'o' : '*';
  const label = (r: number) =>
    (r === row(pct)
      ? `${pct} %`
      : r === 0
        ? `${hi.toFixed(1)} %`
        : r === height - 1
          ? `${lo.toFixed(1)} %`
          : ''
    ).padStart(9);
  return [
    ...grid.map((g, r) => `${label(r)} |${g.join('')}`),
    `${' '.repeat(10)}${day(x0)}${' '.repeat(Math.max(1, width - 20))}${day(x1)}`,
    `${' '.repeat(10)}Cd·a change from the epoch's baseline (* and o alternate by epoch; - threshold)`,
  ];
}

function trendText(v: TrendView, units: UnitSystem): string {
  const area = displayUnit('area', units);
  const s = v.status;
  const out = [
    `outlet ${v.outlet.id} "${v.outlet.key}" of ${v.outlet.vesselName} (${v.outlet.site})${v.outlet.retired ? ', retired' : ''}, as of ${day(v.nowMs)}`,
    `status: ${s.status} — ${s.reason}`,
    `threshold: ${v.threshold.pct} % (${v.threshold.source}); time to threshold: ${days(s.daysToThreshold)}`,
    `next test: ${v.schedule.reason}`,
  ];
  for (const e of v.epochs) {
    out.push(
      '',
      `epoch ${e.index}${e.startedBy ? ` (after ${e.startedBy.kind} on ${day(e.startedBy.atMs)})` : ''}: ${countText(e.series.length, 'approved test')}`,
    );
    out.push(
      `  tested       fit  ${`Cd·a (${area.symbol})`.padStart(12)}  ${`u(Cd·a)`.padStart(9)}  ${'Cd'.padStart(7)}  ${'u(Cd)'.padStart(7)}  change %`,
    );
    for (const p of e.series) {
      const ua = p.effectiveAreaU * area.perSi;
      out.push(
        `  ${p.testedAt.slice(0, 10)} ${String(p.fitId).padStart(5)}  ${toU(p.effectiveAreaM2 * area.perSi, ua).padStart(12)}  ${uncertaintyText(ua).padStart(9)}  ` +
          `${toU(p.dischargeCoefficient, p.dischargeCoefficientU).padStart(7)}  ${uncertaintyText(p.dischargeCoefficientU).padStart(7)}  ${p.changePct.toFixed(2).padStart(8)}${p.isBaseline ? '  baseline' : ''}`,
      );
    }
    if (e.area)
      out.push(
        `  Cd·a line: ${e.area.slopePctPerYear.toFixed(2)} ± ${e.area.slopePctPerYearU.toFixed(2)} %/year (χ²/dof ${e.area.reducedChi2.toFixed(2)})`,
      );
    for (const [k, g] of e.segments.entries())
      if (g.startedBy === 'step')
        out.push(
          `  after the step (segment ${k + 1}, ${g.fitIds.length} test(s)): ${g.area ? `${g.area.slopePctPerYear.toFixed(2)} ± ${g.area.slopePctPerYearU.toFixed(2)} %/year` : 'too few tests for a line'}`,
        );
    if (e.forecast) out.push(`  forecast: ${e.forecast.reason}`);
    if (e.step?.flagged) out.push(`  step: ${e.step.reason}`);
  }
  if (v.skipped.length)
    out.push('', `left out: ${v.skipped.map((k) => `fit ${k.fitId} (${k.why})`).join('; ')}`);
  const chart = asciiChart(v);
  if (chart.length) out.push('', ...chart);
  return out.join('\n') + '\n';
}

/** The fleet as listed: the counts are of the outlets shown (after --status), not of the whole fleet. */
export function fleetText(f: FleetView, statusFilter?: readonly string[]): string {
  const listed: Record<string, number> = {};
  for (const i of f.items) listed[i.status] = (listed[i.status] ?? 0) + 1;
  const inAll = Object.values(f.counts).reduce((a, n) => a + n, 0);
  const out = [
    `fleet as of ${day(f.nowMs)}: ${countText(f.items.length, 'outlet')}` +
      (statusFilter?.length
        ? ` with status ${statusFilter.join(' or ')} (of ${inAll} in all)`
        : '') +
      (f.items.length
        ? '; ' +
          Object.entries(listed)
            .map(([w, n]) => `${n} ${w}`)
            .join(', ')
        : ''),
  ];
  out.push(
    '  outlet  vessel / outlet                      site                 status             to threshold  crossing',
  );
  for (const i of f.items) {
    out.push(
      `  ${String(i.outletId).padStart(6)}  ${clipText(`${i.vesselName} / ${i.outletKey}`, 35).padEnd(35)}  ${clipText(i.site, 19).padEnd(19)}  ` +
        `${i.status.padEnd(17)}  ${days(i.daysToThreshold).padStart(12)}  ${i.crossingAt ? i.crossingAt.slice(0, 10) : '—'}`,
    );
  }
  return out.join('\n') + '\n';
}

function asOfMs(argv: string[]): number {
  const a = option(argv, 'as-of');
  if (a === undefined) return Date.now();
  const ms = Date.parse(a);
  if (!Number.isFinite(ms)) throw new InputError(`not a date: "${a}"`, { field: 'as-of' });
  return ms;
}

export async function run(argv: string[]): Promise<number> {
  if (argv.includes('--help') || argv.length === 0) {
    (argv.length ? process.stdout : process.stderr).write(USAGE);
    return argv.length ? 0 : 2;
  }
  return guarded(async () => {
    const json = argv.includes('--json');
    const csv = argv.includes('--csv');
    if (json && csv) throw new InputError('give --json or --csv, not both', { field: 'json' });
    const nowMs = asOfMs(argv);
    const units = unitsFrom(option(argv, 'units'));
    const store = await openStore(storeLocation());
    try {
      if (argv.includes('--fleet')) {
        if (csv) throw new InputError("--csv is for one outlet's history", { field: 'csv' });
        const words = option(argv, 'status')
          ?.split(',')
          .map((s) => s.trim())
          .filter(Boolean);
        for (const w of words ?? [])
          if (!(STATUS_WORDS as readonly string[]).includes(w))
            throw new InputError(`unknown status "${w}"`, { field: 'status' });
        const part = option(argv, 'site');
        const sites =
          part === undefined
            ? undefined
            : await sitesByPart(store, part, (l) =>
                (json ? process.stderr : process.stdout).write(`${l}\n`),
              );
        const f = await fleetStatus(store, { sites, status: words as never }, nowMs);
        process.stdout.write(json ? JSON.stringify(f, null, 2) + '\n' : fleetText(f, words));
        return 0;
      }
      const first = argv.find(
        (a, i) =>
          !a.startsWith('--') &&
          !['--as-of', '--site', '--status', '--units'].includes(argv[i - 1]),
      );
      if (first === undefined)
        throw new InputError('name the outlet: its id or tag (efflux trend FD-2)', {
          field: 'outlet',
        });
      const id = (await refusalsAsInput(() => outletByName(store, first, option(argv, 'site'))))
        .outletId;
      let view: TrendView;
      try {
        view = await outletTrendView(store, id, nowMs);
      } catch (e) {
        if (e instanceof NotFoundError) throw new InputError(e.message, { field: 'outletId' });
        throw e;
      }
      process.stdout.write(
        json
          ? JSON.stringify(view, null, 2) + '\n'
          : csv
            ? historyCsv(view)
            : trendText(view, units),
      );
      return 0;
    } finally {
      await store.close();
    }
  });
}
