/** The vessel page's trend of approved tests per outlet, and the maintenance record with its entry form. */
import { api, ApiError, type MaintenanceEvent, type Outlet } from '../api.js';
import { field, h, notice, select, table } from '../dom.js';
import { area, date, duration, num, plusMinus, unitOf } from '../format.js';
import { trendChart, type FullTrend, type TrendQuantity } from '../trend-chart.js';

const STATUS_CLASS: Record<string, string> = {
  'past threshold': 'bad',
  'sudden change': 'bad',
  'action due soon': 'warn',
  drifting: 'warn',
  'not enough tests': 'quiet',
  steady: 'ok',
};

function pct(v: number | null | undefined, u?: number | null): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return u === null || u === undefined ? `${v.toFixed(1)} %` : plusMinus(v, u, '%');
}

/** The service's reason as a sentence: capital first letter, full stop. */
const sentence = (s: string) => s.replace(/^./, (c) => c.toUpperCase()).replace(/\.?$/, '.');

function forecastWords(t: FullTrend): string {
  const fc = t.epochs.find((e) => e.current)?.forecast;
  if (!fc) return 'No forecast: the present epoch has too few approved tests.';
  if (fc.status === 'forecast' && fc.crossingMs) {
    const lo = fc.lowerMs ? date(new Date(fc.lowerMs).toISOString()) : 'open';
    const hi = fc.upperMs ? date(new Date(fc.upperMs).toISOString()) : 'not bounded';
    return `Forecast: the action threshold is reached about ${date(new Date(fc.crossingMs).toISOString())} (95 % interval ${lo} to ${hi}${fc.daysFromNow !== null ? `; in about ${duration(fc.daysFromNow)}` : ''}).`;
  }
  return `Forecast: ${fc.reason.replace(/\.?$/, '.')}`;
}

/** When the next test is due; when overdue, how old the latest test is and what a test today would read. */
function scheduleWords(t: FullTrend): HTMLElement | null {
  const s = t.schedule;
  if (!s) return null;
  const now = t.epochs.find((e) => e.current)?.newTestNow ?? null;
  const parts = [`Next test: ${sentence(s.reason)}`];
  if (s.overdue && now) {
    parts.push(
      `A test today is expected to read ${area(now.value, now.halfWidth95)} (95 % prediction interval for a new test; it widens the longer the outlet goes untested).`,
    );
  }
  return h(
    'p',
    {
      class: `trend-schedule${s.overdue ? ' schedule-overdue' : ''}`,
      'data-overdue': String(s.overdue),
    },
    parts.join(' '),
  );
}

/** The epoch's drift; cut at a flagged step, each side's own (the whole-epoch line would run through the step). */
function driftCell(e: FullTrend['epochs'][number]): string {
  const one = (l: typeof e.area) =>
    l
      ? `${pct(l.slopePctPerYear, 2 * l.slopePctPerYearU)} a year (±2u)`
      : 'too few tests for a line';
  if (e.segments && e.segments.length > 1)
    return e.segments
      .map((g, k) => `${k === 0 ? 'before the step' : 'from the step'}: ${one(g.area)}`)
      .join('; ');
  return e.area ? one(e.area) : '—';
}

function outletTrend(o: Outlet, t: FullTrend): HTMLElement {
  const wrap = h('div', { class: 'trend-outlet', 'data-outlet': o.id });
  const points = t.epochs.reduce((s, e) => s + e.series.length, 0);
  const cur = t.epochs.find((e) => e.current) ?? null;
  const cls = STATUS_CLASS[t.status.status] ?? 'quiet';
  wrap.append(
    h(
      'div',
      { class: 'title-row' },
      h('h3', {}, `Outlet ${o.key}`),
      h('span', { class: `status status-${cls}` }, t.status.status),
    ),
    h(
      'p',
      { class: 'trend-status' },
      sentence(t.status.reason),
      ' ',
      t.status.crossingAt && t.status.reason.includes(date(t.status.crossingAt))
        ? ''
        : forecastWords(t),
    ),
  );
  const schedule = scheduleWords(t);
  if (schedule) wrap.append(schedule);
  if (!points) {
    wrap.append(h('p', {}, 'No approved test yet: the trend starts with the first approved fit.'));
    return wrap;
  }
  const quantity = select(
    `trend-q-${o.id}`,
    [
      ['area', `effective area Cd·a (${unitOf('area').symbol})`],
      ['cd', 'discharge coefficient Cd'],
    ],
    'area',
  );
  const box = h('div', { class: 'chart trend-chart', id: `trend-${o.id}`, role: 'img' });
  box.dataset.points = String(points);
  box.dataset.epochs = String(t.epochs.length);
  box.setAttribute(
    'aria-label',
    `Trend of outlet ${o.key}: ${points} approved tests in ${t.epochs.length} epoch(s); status ${t.status.status}`,
  );
  wrap.append(
    h(
      'div',
      { class: 'trend-controls' },
      field('Show', quantity),
      h(
        'a',
        { href: `/api/outlets/${o.id}/history.csv`, download: `outlet-${o.key}-history.csv` },
        'History as CSV',
      ),
      h('a', { href: `/api/outlets/${o.id}/report.pdf` }, 'Outlet report (PDF)'),
    ),
    box,
    h(
      'ul',
      { class: 'chart-key' },
      h(
        'li',
        {},
        h('span', { class: 'key key-point' }),
        'approved test, bar ±2 standard uncertainties',
      ),
      h(
        'li',
        {},
        h('span', { class: 'key key-line' }),
        'weighted trend line of the epoch, shaded: its 95 % band',
      ),
      h('li', {}, h('span', { class: 'key key-baseline' }), 'baseline of the epoch'),
      h(
        'li',
        {},
        h('span', { class: 'key key-threshold' }),
        `action threshold (${num(t.threshold.pct, 3)} % from the baseline)`,
      ),
      h('li', {}, h('span', { class: 'key key-maint' }), 'maintenance (starts a new epoch)'),
      h(
        'li',
        {},
        h('span', { class: 'key key-forecast' }),
        'forecast crossing date and its 95 % interval',
      ),
      h(
        'li',
        {},
        h('span', { class: 'key key-step' }),
        'sudden step flagged (the line is cut there)',
      ),
      h(
        'li',
        {},
        h('span', { class: 'key key-newtest' }),
        'dashed: 95 % interval of a new test after the last one',
      ),
      h('li', {}, h('span', { class: 'key key-today' }), 'today'),
    ),
  );
  let chart: ReturnType<typeof trendChart> | null = null;
  const draw = () => {
    chart?.destroy();
    box.replaceChildren();
    chart = trendChart(box, t, quantity.value as TrendQuantity);
  };
  quantity.addEventListener('change', draw);
  requestAnimationFrame(draw);
  if (cur) {
    const line = cur.area;
    wrap.append(
      table(
        null,
        [
          'Epoch',
          'Started by',
          'Approved tests',
          'Drift of Cd·a',
          'Baseline Cd·a',
          'Threshold Cd·a',
          'Step check',
        ],
        t.epochs.map((e) => [
          `${e.index + 1}${e.current ? ' (present)' : ''}`,
          e.startedBy ? `${e.startedBy.kind} on ${date(e.startedBy.at)}` : 'first test',
          String(e.series.length),
          driftCell(e),
          e.area ? area(e.area.baselineValue) : '—',
          e.thresholdM2 !== null ? area(e.thresholdM2) : '—',
          e.step ? (e.step.flagged ? `flagged: ${e.step.reason}` : 'no step') : '—',
        ]),
        'trend-table',
      ),
    );
    if (line && t.skipped.length)
      wrap.append(
        h(
          'p',
          { class: 'hint' },
          `${t.skipped.length} approved fit(s) left out of the trend: ${t.skipped.map((s) => s.why).join('; ')}`,
        ),
      );
  }
  return wrap;
}

export function trendSection(
  outlets: Outlet[],
  trends: Map<number, FullTrend | null>,
): HTMLElement {
  const section = h('section', { class: 'trend' }, h('h2', {}, 'Trend of approved tests'));
  section.append(
    h(
      'p',
      { class: 'hint' },
      'Only approved fits count. Each cleaning, replacement or change of an outlet starts a new epoch with its own baseline; drift is fitted by weighted least squares within the epoch, weights from each test’s uncertainty.',
    ),
  );
  for (const o of outlets) {
    const t = trends.get(o.id);
    if (t) section.append(outletTrend(o, t));
  }
  return section;
}

export function maintenanceSection(
  vesselId: number,
  outlets: Outlet[],
  events: MaintenanceEvent[],
  canRecord: boolean,
): HTMLElement {
  const section = h('section', { class: 'maintenance' }, h('h2', {}, 'Maintenance'));
  section.append(
    events.length
      ? table(
          'Recorded maintenance',
          ['Date', 'Outlet', 'What was done', 'Notes'],
          [...events]
            .sort((a, b) => Date.parse(b.occurredAt) - Date.parse(a.occurredAt))
            .map((e) => [
              date(e.occurredAt),
              outlets.find((o) => o.id === e.outletId)?.key ?? 'every outlet',
              e.kind,
              e.notes ?? '',
            ]),
        )
      : h('p', {}, 'No maintenance recorded.'),
  );
  if (!canRecord) return section;
  const kind = select(
    'kind',
    [
      ['cleaned', 'cleaned'],
      ['replaced', 'replaced'],
      ['modified', 'modified (bore or fitting changed)'],
    ],
    'cleaned',
  );
  const outlet = select(
    'outletId',
    [
      ...outlets.map((o): [string, string] => [String(o.id), o.key]),
      ['', 'every outlet of the vessel'],
    ],
    outlets[0] ? String(outlets[0].id) : '',
  );
  const when = h('input', {
    type: 'date',
    name: 'occurredAt',
    required: true,
    value: new Date().toISOString().slice(0, 10),
  });
  const notes = h('textarea', { name: 'notes', rows: 2, maxlength: 10000 });
  const status = h('div', { 'aria-live': 'polite' });
  const submit = h('button', { type: 'submit', class: 'primary' }, 'Record maintenance');
  const form = h(
    'form',
    { class: 'event-form' },
    h(
      'fieldset',
      {},
      h('legend', {}, 'Record maintenance on an outlet'),
      h(
        'div',
        { class: 'grid' },
        field('What was done', kind),
        field('Outlet', outlet),
        field('Date', when),
      ),
      field('Notes', notes, 'e.g. descaled with dilute acid, bore measured 49.8 mm'),
      h(
        'div',
        { class: 'actions' },
        submit,
        h('span', { class: 'hint' }, 'The outlet’s trend starts a new epoch from this date.'),
      ),
    ),
    status,
  );
  form.addEventListener('submit', async (ev) => {
    ev.preventDefault();
    submit.disabled = true;
    status.replaceChildren();
    try {
      await api('POST', `/api/vessels/${vesselId}/events`, {
        kind: kind.value,
        outletId: outlet.value ? Number(outlet.value) : null,
        occurredAt: when.value,
        notes: notes.value.trim() || undefined,
      });
      // the page is drawn again, with the new epoch in the trend
      window.dispatchEvent(new HashChangeEvent('hashchange'));
    } catch (e) {
      status.append(notice('error', e instanceof ApiError ? e.message : String(e)));
      submit.disabled = false;
    }
  });
  section.append(form);
  return section;
}
