/** One vessel: its geometry and outlets, a drawing to scale, its tests, and Cd over time. */
import {
  api,
  canReview,
  canUpload,
  optional,
  seesMaintenance,
  type MaintenanceEvent,
  type Page,
  type Vessel,
} from '../api.js';
import { historyChart } from '../charts.js';
import { h, notice, table } from '../dom.js';
import { vesselDrawing } from '../drawing.js';
import { date, metres, num, outletName, plusMinus, shapeName } from '../format.js';
import { current, vesselHistory } from '../history.js';
import type { PageContext } from '../main.js';
import type { FullTrend } from '../trend-chart.js';
import { pendingSection } from './pending-tests.js';
import { canEditVessels, revisionsSection } from './vessel-edit.js';
import { maintenanceSection, trendSection } from './vessel-trend.js';

const SHAPE_FIELDS: [string, string][] = [
  ['diameterM', 'Diameter'],
  ['lengthM', 'Length'],
  ['widthM', 'Width'],
  ['coneHeightM', 'Cone height'],
  ['heightM', 'Height'],
];

function geometryRows(shape: Record<string, unknown>): [string, string][] {
  const rows: [string, string][] = [['Shape', shapeName(String(shape.kind))]];
  for (const [k, label] of SHAPE_FIELDS)
    if (typeof shape[k] === 'number') rows.push([label, metres(shape[k] as number)]);
  if (Array.isArray(shape.points)) {
    rows.push([
      'Surveyed points',
      (shape.points as [number, number][]).map(([y, a]) => `${num(y)} m: ${num(a)} m²`).join('; '),
    ]);
  }
  return rows;
}

export async function vesselPage({ user, params, main, go }: PageContext): Promise<void> {
  const id = Number(params[0]);
  const v = await api<Vessel>('GET', `/api/vessels/${id}`);
  const [hist, events] = await Promise.all([
    vesselHistory(id),
    seesMaintenance(user)
      ? api<Page<MaintenanceEvent>>('GET', `/api/vessels/${id}/events?limit=500`)
          .then((p) => p.items)
          .catch(() => [] as MaintenanceEvent[])
      : Promise.resolve([] as MaintenanceEvent[]),
  ]);
  const spec = v.spec;
  const shape = (spec.shape ?? {}) as Record<string, unknown>;
  const sensor = (spec.sensor ?? {}) as Record<string, unknown>;
  const fluid = (spec.fluid ?? {}) as Record<string, unknown>;
  const outlets = v.outlets.filter((o) => o.retiredAt === null);

  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      v.name,
    ),
    h(
      'div',
      { class: 'title-row' },
      h('h1', {}, v.name),
      h(
        'span',
        { class: 'title-actions' },
        canEditVessels(user)
          ? h('a', { href: `#/vessels/${id}/edit`, class: 'button' }, 'Edit vessel')
          : null,
        ' ',
        h('a', { href: `#/vessels/${id}/plan`, class: 'button' }, 'Plan a test'),
        ' ',
        canUpload(user)
          ? h('a', { href: `#/vessels/${id}/live`, class: 'button' }, 'Live test')
          : null,
        ' ',
        canUpload(user)
          ? h('a', { href: `#/vessels/${id}/new-test`, class: 'button primary' }, 'New drain test')
          : null,
      ),
    ),
    h(
      'p',
      { class: 'lede' },
      `${v.site} · vessel file revision ${v.revision}`,
      typeof spec.notes === 'string' ? ` · ${spec.notes}` : '',
    ),
  );

  const facts = h(
    'div',
    { class: 'facts' },
    table(
      'Geometry',
      ['', ''],
      [
        ...geometryRows(shape),
        [
          'Sensor',
          typeof sensor.zeroElevationM === 'number'
            ? `zero ${metres(sensor.zeroElevationM as number)} above the bottom`
            : typeof sensor.mountElevationM === 'number'
              ? `gauge face ${metres(sensor.mountElevationM as number)} above the bottom, measuring down`
              : 'zero not stated (fit the sensor zero)',
        ],
        [
          'Liquid',
          typeof fluid.densityKgM3 === 'number'
            ? `${num(fluid.densityKgM3 as number)} kg/m³`
            : typeof fluid.temperatureC === 'number'
              ? `water at ${num(fluid.temperatureC as number)} °C`
              : 'water at 20 °C (assumed)',
        ],
      ],
      'kv',
    ),
    table(
      'Outlets',
      ['Outlet', 'Kind', 'Bore', 'Bore tolerance', 'Height above bottom', 'Act when Cd·a falls to'],
      outlets.map((o) => [
        o.key,
        outletName(o.type),
        o.boreM ? `${(o.boreM * 1000).toFixed(1)} mm` : '—',
        o.boreToleranceM ? `± ${(o.boreToleranceM * 1000).toFixed(2)} mm` : '—',
        metres(o.elevationM),
        o.actionThreshold === null
          ? 'the default share of the baseline'
          : `${num(o.actionThreshold * 100, 3)} % of the baseline`,
      ]),
    ),
  );
  const drawing = vesselDrawing(spec, {
    outlets: outlets.map((o) => ({ name: o.key, elevationM: o.elevationM ?? 0 })),
    sensorZeroM:
      typeof sensor.zeroElevationM === 'number' ? (sensor.zeroElevationM as number) : null,
    mountElevationM:
      typeof sensor.mountElevationM === 'number' ? (sensor.mountElevationM as number) : null,
  });
  main.append(
    h(
      'section',
      { class: 'vessel-top' },
      facts,
      h(
        'figure',
        { class: 'card drawing' },
        drawing,
        h('figcaption', {}, 'Drawn to scale from the vessel file'),
      ),
    ),
  );

  // the trend of approved tests per outlet (the trend service), then every test including drafts
  const trends = new Map<number, FullTrend | null>(
    await Promise.all(
      outlets.map(
        async (o) =>
          [o.id, await optional<FullTrend>(`/api/outlets/${o.id}/trend`)] as [
            number,
            FullTrend | null,
          ],
      ),
    ),
  );
  if (outlets.some((o) => trends.get(o.id))) main.append(trendSection(outlets, trends));

  const section = h('section', {}, h('h2', {}, 'Every test, drafts included'));
  main.append(section);
  const fits = current(hist.fits).filter((f) => f.fit.result.dischargeCoefficient);
  for (const o of outlets.length ? outlets : [null]) {
    const mine = fits.filter(
      (f) => o === null || f.fit.outletId === o.id || f.fit.outletId === null,
    );
    const box = h('div', { class: 'chart', id: `history-${o?.id ?? 0}` });
    section.append(h('h3', {}, o ? `Outlet ${o.key}` : 'Outlet'));
    if (!mine.length) {
      section.append(h('p', {}, 'No fitted test yet.'));
      continue;
    }
    if (o && mine.filter((f) => f.fit.outletId === o.id).length >= 2)
      section.append(
        h(
          'p',
          {},
          h(
            'a',
            { href: `#/vessels/${id}/outlets/${o.id}/compare`, class: 'compare-link' },
            `Compare tests of ${o.key} side by side`,
          ),
        ),
      );
    const evs = events.filter((e) => o === null || e.outletId === null || e.outletId === o.id);
    section.append(
      h(
        'p',
        { class: 'hint' },
        'Each point is one test; its bar is the expanded uncertainty (about 95 %). Filled: approved; open: waiting for review.',
        evs.length ? ' Dashed brown lines: maintenance.' : '',
        '',
      ),
      box,
    );
    // counts for tests and assistive text (the canvas itself has no readable content)
    box.dataset.points = String(mine.length);
    box.dataset.approved = String(mine.filter((f) => f.fit.status === 'approved').length);
    box.setAttribute('role', 'img');
    box.setAttribute(
      'aria-label',
      `Cd of outlet ${o?.key ?? ''} over time: ${mine.length} tests, ${box.dataset.approved} approved`,
    );
    const trend = o ? (trends.get(o.id) ?? null) : null;
    const epoch = trend?.epochs.find((e) => e.current) ?? null;
    const baseline = epoch?.cd?.baselineValue ?? null;
    const threshold = epoch?.thresholdCd ?? null;
    historyChart(
      box,
      mine.map((f) => ({
        atS: Date.parse(f.at) / 1000,
        cd: f.fit.result.dischargeCoefficient!.value,
        expanded:
          f.fit.result.dischargeCoefficient!.expandedUncertainty ??
          2 * (f.fit.result.dischargeCoefficient!.standardUncertainty ?? NaN),
        status: f.fit.status,
      })),
      evs.map((e) => ({ atS: Date.parse(e.occurredAt) / 1000, kind: e.kind })),
      { threshold, baseline },
    );
  }

  main.append(await revisionsSection(v));

  if (seesMaintenance(user)) main.append(maintenanceSection(id, outlets, events, canReview(user)));

  // the tests, newest first
  const testsSection = h('section', {}, h('h2', {}, 'Drain tests'));
  main.append(testsSection);
  if (!hist.tests.length) {
    testsSection.append(notice('info', 'No drain test yet.'));
    return;
  }
  const pending = pendingSection(user, hist.tests, () => go(location.hash));
  if (pending) testsSection.before(pending);
  const latestFitOf = (testId: number) =>
    hist.fits.filter((f) => f.fit.testId === testId && f.fit.supersededBy === null)[0] ??
    hist.fits.find((f) => f.fit.testId === testId);
  testsSection.append(
    table(
      'Tests of this vessel',
      ['Tested', 'Logger file', 'Outlet', 'Operator', 'Cd ± expanded uncertainty', 'Fit'],
      hist.tests.map((t) => {
        const f = latestFitOf(t.id);
        const cd = f?.fit.result.dischargeCoefficient;
        return [
          h('time', {}, date(f?.at ?? t.testedAt ?? t.createdAt)),
          // the stored bytes under their original name (an auditor's copy of the evidence)
          h(
            'a',
            { href: `/api/tests/${t.id}/raw`, download: t.fileName, class: 'raw-download' },
            t.fileName,
          ),
          v.outlets.find((o) => o.id === t.outletId)?.key ?? '—',
          t.operator ?? '—',
          cd
            ? plusMinus(cd.value, cd.expandedUncertainty ?? 2 * (cd.standardUncertainty ?? NaN))
            : t.status === 'pending'
              ? t.stuck
                ? 'analysis failed: retry or withdraw'
                : 'waiting for analysis'
              : '—',
          f
            ? h(
                'a',
                { href: `#/fits/${f.fit.id}`, class: `badge badge-${f.fit.status}` },
                `${f.fit.status} · open`,
              )
            : '—',
        ];
      }),
    ),
  );
}
