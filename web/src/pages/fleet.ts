/** Every vessel and outlet with its latest Cd, the date of its last test, and (when offered) its drift. */
import { api, type FleetStatusItem, type Page, type Vessel } from '../api.js';
import { field, h, select } from '../dom.js';
import { date, outletName, plusMinus, shapeName } from '../format.js';
import { driftWords, fleetDrift, latestFor, vesselHistory, type TestedFit } from '../history.js';
import type { PageContext } from '../main.js';

interface Row {
  vessel: Vessel;
  outlet: Vessel['outlets'][number] | null;
  latest: TestedFit | null;
  tests: number;
  drift: string | null;
  /** Days until the action threshold: past it first, then soonest, then none (for the sort). */
  due: number;
  /** When the next drain test falls due (GET /api/fleet), null when the service does not say. */
  schedule: FleetStatusItem['schedule'];
}

/** "2026-09-03" with "overdue 93 days" or "in 12 days"; never tested: due now. */
function nextTestCell(s: FleetStatusItem['schedule']): HTMLElement {
  if (!s) return h('td', {}, '—');
  if (s.neverTested)
    return h('td', { class: 'due due-overdue', title: s.reason }, 'due now (never tested)');
  const days = Math.round(Math.abs(s.daysUntilDue ?? 0));
  return h(
    'td',
    { class: `due ${s.overdue ? 'due-overdue' : 'due-ok'}`, title: s.reason },
    h('span', { class: 'nowrap' }, date(s.nextDueAt)),
    ' ',
    s.overdue
      ? h('strong', { class: 'badge badge-overdue' }, `overdue ${days} d`)
      : h('span', { class: 'muted' }, `in ${days} d`),
  );
}

const dueOf = (d: { status: string; daysToThreshold: number | null } | undefined) =>
  !d
    ? Infinity
    : d.status === 'past threshold'
      ? -Infinity
      : d.daysToThreshold !== null && Number.isFinite(d.daysToThreshold)
        ? d.daysToThreshold
        : Infinity;

export async function fleetPage({ main }: PageContext): Promise<void> {
  main.append(
    h('h1', {}, 'Fleet'),
    h(
      'p',
      { class: 'lede' },
      'Every vessel and outlet with its latest discharge coefficient. Choose a vessel for its drawing, its tests and its history.',
    ),
  );
  const vessels = await api<Page<Vessel>>('GET', '/api/vessels?limit=500');
  const [histories, drift] = await Promise.all([
    Promise.all(vessels.items.map((v) => vesselHistory(v.id))),
    fleetDrift(),
  ]);
  const rows: Row[] = [];
  vessels.items.forEach((v, i) => {
    const active = v.outlets.filter((o) => o.retiredAt === null);
    for (const o of active.length ? active : [null]) {
      const tests = histories[i].tests.filter(
        (t) => o === null || t.outletId === o.id || t.outletId === null,
      ).length;
      rows.push({
        vessel: v,
        outlet: o,
        latest: latestFor(o, histories[i].fits),
        tests,
        drift: o ? driftWords(drift.get(o.id)) : null,
        due: o ? dueOf(drift.get(o.id)) : Infinity,
        schedule: (o && drift.get(o.id)?.schedule) ?? null,
      });
    }
  });
  const anyDrift = drift.size > 0;
  const anySchedule = rows.some((r) => r.schedule);

  const search = h('input', {
    type: 'search',
    name: 'q',
    placeholder: 'vessel, site or outlet',
    autocomplete: 'off',
  });
  const sites = [...new Set(vessels.items.map((v) => v.site))].sort();
  const site = select('site', [['', 'all sites'], ...sites.map((s): [string, string] => [s, s])]);
  const state = select('state', [
    ['', 'all outlets'],
    ['approved', 'with an approved fit'],
    ['draft', 'latest fit waiting for review'],
    ['none', 'never tested'],
    ['overdue', 'overdue for a test'],
  ]);
  const order = select(
    'order',
    anyDrift
      ? [
          ['due', 'time to the action threshold, soonest first'],
          ['next-test', 'next drain test due, soonest first'],
          ['name', 'vessel name'],
        ]
      : [['name', 'vessel name']],
    anyDrift ? 'due' : 'name',
  );
  const count = h('p', { class: 'count', 'aria-live': 'polite' });
  const body = h('tbody');
  // secondary columns (class "secondary") give way below 1000 px: the table reflows, never scrolls sideways
  const head: [string, boolean][] = [
    ['Vessel', false],
    ['Site', true],
    ['Shape', true],
    ['Outlet', false],
    ['Latest Cd ± expanded uncertainty (k)', false],
    ['Fit', false],
    ['Last test', false],
    ['Tests', true],
    ...(anySchedule ? ([['Next test due', false]] as [string, boolean][]) : []),
    ...(anyDrift ? ([['Drift status', false]] as [string, boolean][]) : []),
  ];
  const tableEl = h(
    'table',
    { class: 'fleet' },
    h('caption', { class: 'visually-hidden' }, 'Vessels and outlets'),
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        head.map(([t, secondary]) =>
          h('th', { scope: 'col', class: secondary ? 'secondary' : '' }, t),
        ),
      ),
    ),
    body,
  );

  const draw = () => {
    const q = search.value.trim().toLowerCase();
    const shown = rows.filter((r) => {
      if (site.value && r.vessel.site !== site.value) return false;
      if (state.value === 'none' && r.latest) return false;
      if (state.value === 'approved' && r.latest?.fit.status !== 'approved') return false;
      if (state.value === 'draft' && r.latest?.fit.status !== 'draft') return false;
      if (state.value === 'overdue' && !r.schedule?.overdue) return false;
      if (!q) return true;
      return [r.vessel.name, r.vessel.site, r.outlet?.key ?? ''].some((s) =>
        s.toLowerCase().includes(q),
      );
    });
    const nextMs = (r: Row) => (r.schedule ? (r.schedule.nextDueMs ?? -Infinity) : Infinity);
    if (order.value === 'next-test')
      shown.sort((a, b) => nextMs(a) - nextMs(b) || a.vessel.name.localeCompare(b.vessel.name));
    if (order.value === 'due')
      shown.sort((a, b) =>
        a.due === b.due ? a.vessel.name.localeCompare(b.vessel.name) : a.due < b.due ? -1 : 1,
      );
    body.replaceChildren(
      ...shown.map((r) => {
        const cd = r.latest?.fit.result.dischargeCoefficient;
        const k = cd?.coverageFactor;
        return h(
          'tr',
          {},
          h('th', { scope: 'row' }, h('a', { href: `#/vessels/${r.vessel.id}` }, r.vessel.name)),
          h('td', { class: 'secondary' }, r.vessel.site),
          h(
            'td',
            { class: 'secondary' },
            shapeName(String((r.vessel.spec.shape as { kind?: string } | undefined)?.kind ?? '')),
          ),
          h(
            'td',
            {},
            r.outlet
              ? `${r.outlet.key} (${outletName(r.outlet.type)}${r.outlet.boreM ? `, ${(r.outlet.boreM * 1000).toFixed(1)} mm bore` : ''})`
              : 'no outlet',
          ),
          h(
            'td',
            { class: 'num' },
            cd
              ? [
                  plusMinus(
                    cd.value,
                    cd.expandedUncertainty ?? 2 * (cd.standardUncertainty ?? NaN),
                  ),
                  k ? h('span', { class: 'k' }, ` (k = ${k.toFixed(2)})`) : '',
                ]
              : '—',
          ),
          h(
            'td',
            {},
            r.latest
              ? h(
                  'a',
                  {
                    href: `#/fits/${r.latest.fit.id}`,
                    class: `badge badge-${r.latest.fit.status}`,
                  },
                  r.latest.fit.status,
                )
              : '—',
          ),
          h('td', {}, r.latest ? h('time', { datetime: r.latest.at }, date(r.latest.at)) : '—'),
          h('td', { class: 'num secondary' }, String(r.tests)),
          ...(anySchedule ? [nextTestCell(r.schedule)] : []),
          ...(anyDrift
            ? [
                h(
                  'td',
                  {
                    title: (r.outlet && drift.get(r.outlet.id)?.reason) || '',
                    class: `drift drift-${(r.outlet && drift.get(r.outlet.id)?.status.replace(/\s+/g, '-')) || 'none'}`,
                  },
                  r.drift ?? '—',
                ),
              ]
            : []),
        );
      }),
    );
    count.textContent = `${shown.length} of ${rows.length} outlets shown${anyDrift ? '' : ' · drift status appears here once the service offers it'}`;
  };
  for (const c of [search, site, state, order]) c.addEventListener('input', draw);
  main.append(
    h(
      'div',
      { class: 'filters' },
      field('Search', search),
      field('Site', site),
      field('Show', state),
      field('Order by', order),
    ),
    count,
    h('div', { class: 'table-wrap' }, tableEl),
  );
  draw();
}
