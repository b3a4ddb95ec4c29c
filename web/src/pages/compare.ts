/**
 * Tests side by side (#/vessels/ID/outlets/OID/compare): tick two or more tests of one outlet and see
 * their readings against head with each fitted curve, Cd·a and Cd with expanded uncertainties, and
 * for each pair the difference, its expanded uncertainty and E_n in words. The numbers come from
 * GET /api/outlets/:id/compare (server/core/compare); the page only draws them.
 */
import { api, ApiError, type TestComparison, type Vessel } from '../api.js';
import { comparisonChart } from '../compare-chart.js';
import { h, notice, table } from '../dom.js';
import { area, date, metres, plusMinus, unitOf } from '../format.js';
import { current, vesselHistory } from '../history.js';
import type { PageContext } from '../main.js';

type Pair = TestComparison['pairs'][number];
type En = Pair['effectiveArea'];

/** "E_n = −0.42" and the verdict in words. */
const enCells = (c: En): [string, string] =>
  c
    ? [
        c.en.toFixed(2).replace('-', '−'),
        Math.abs(c.en) <= 1 ? 'agrees (|En| ≤ 1)' : 'differs (|En| > 1)',
      ]
    : ['—', 'no uncertainty to compare'];

export async function comparePage({ params, main }: PageContext): Promise<void> {
  const vesselId = Number(params[0]);
  const outletId = Number(params[1]);
  const [vessel, hist] = await Promise.all([
    api<Vessel>('GET', `/api/vessels/${vesselId}`),
    vesselHistory(vesselId),
  ]);
  const outlet = vessel.outlets.find((o) => o.id === outletId);
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${vessel.id}` }, vessel.name),
      ` › outlet ${outlet?.key ?? outletId} › tests side by side`,
    ),
    h('h1', {}, `Tests side by side · ${vessel.name}, outlet ${outlet?.key ?? outletId}`),
    h(
      'p',
      { class: 'lede' },
      'Tick two or more tests. Each is drawn against the head above the outlet, timed from the highest head all of them reach, so two drains with the same Cd·a lie on one line. ' +
        'Two results agree when |En| ≤ 1, En being their difference over the expanded uncertainty of the difference, √(U₁² + U₂²) (ISO/IEC 17043, Annex B).',
    ),
  );
  if (!outlet) {
    main.append(notice('error', `Vessel ${vessel.name} has no outlet ${outletId}.`));
    return;
  }
  const mine = current(hist.fits)
    .filter((f) => f.fit.outletId === outletId)
    .sort((a, b) => Date.parse(b.at) - Date.parse(a.at));
  if (mine.length < 2) {
    main.append(notice('info', 'This outlet has fewer than two fitted tests: nothing to compare.'));
    return;
  }
  const boxes = mine.map((f, i) => {
    const cd = f.fit.result.dischargeCoefficient;
    const box = h('input', {
      type: 'checkbox',
      name: 'test',
      value: String(f.fit.testId),
      checked: i < 2, // the two newest, a common first question (before and after)
    });
    return h(
      'label',
      { class: 'choice' },
      box,
      ` test ${f.fit.testId} · ${date(f.at)} · ${f.test?.fileName ?? ''} · Cd ${cd ? plusMinus(cd.value, cd.expandedUncertainty) : '—'} · ${f.fit.status}`,
    );
  });
  const go = h('button', { type: 'submit', class: 'primary' }, 'Compare');
  const out = h('div', { class: 'comparison', 'aria-live': 'polite' });
  const form = h(
    'form',
    { class: 'compare-form' },
    h(
      'fieldset',
      {},
      h('legend', {}, 'Tests of this outlet'),
      ...boxes.map((b) => h('div', {}, b)),
    ),
    h('div', { class: 'actions' }, go),
  );
  main.append(form, out);

  const show = async () => {
    out.replaceChildren();
    const ids = Array.from(
      form.querySelectorAll<HTMLInputElement>('input[name=test]:checked'),
      (b) => b.value,
    );
    if (ids.length < 2) {
      out.append(notice('info', 'Tick at least two tests.'));
      return;
    }
    let c: TestComparison;
    try {
      c = await api<TestComparison>(
        'GET',
        `/api/outlets/${outletId}/compare?tests=${ids.join(',')}`,
      );
    } catch (e) {
      out.append(notice('error', e instanceof ApiError ? e.message : String(e)));
      return;
    }
    const chart = h('div', { class: 'chart', id: 'comparison-chart', role: 'img' });
    chart.setAttribute(
      'aria-label',
      `Readings against head of ${c.tests.length} tests, each with its fitted curve`,
    );
    out.append(
      h('h2', {}, 'Readings against head'),
      h(
        'p',
        { class: 'hint' },
        c.referenceHeadM === null
          ? 'Dots: readings; lines: the fitted curves. The tests share no head, so each is timed from the start of its window.'
          : `Dots: readings (thinned for drawing); lines: the fitted curves. Time counts from ${metres(c.referenceHeadM)} above the outlet.`,
      ),
      chart,
      ...c.notes.map((n) => notice('caution', n)),
      table(
        'Results (expanded uncertainties U, about 95 %)',
        ['Test', 'Tested', 'Fit', `Cd·a ± U (${unitOf('area').symbol})`, 'Cd ± U'],
        c.tests.map((t) => [
          `test ${t.testId}`,
          date(t.testedAt),
          h('a', { href: `#/fits/${t.fitId}` }, `fit ${t.fitId} (${t.fitStatus})`),
          t.effectiveAreaM2
            ? area(t.effectiveAreaM2.value, t.effectiveAreaM2.expandedUncertainty).replace(
                ` ${unitOf('area').symbol}`,
                '',
              )
            : '—',
          t.dischargeCoefficient
            ? plusMinus(t.dischargeCoefficient.value, t.dischargeCoefficient.expandedUncertainty)
            : '—',
        ]),
        'comparison-results',
      ),
      table(
        'Each pair: first − second, with the expanded uncertainty of the difference',
        [
          'Pair',
          `Δ Cd·a ± U (${unitOf('area').symbol})`,
          'En of Cd·a',
          'Cd·a',
          'Δ Cd ± U',
          'En of Cd',
          'Cd',
        ],
        c.pairs.map((p) => {
          const a = p.effectiveArea;
          const d = p.dischargeCoefficient;
          const perSi = unitOf('area').perSi;
          return [
            `${p.first} − ${p.second}`,
            a ? plusMinus(a.difference * perSi, a.expandedUncertaintyOfDifference * perSi) : '—',
            ...enCells(a),
            d ? plusMinus(d.difference, d.expandedUncertaintyOfDifference) : '—',
            ...enCells(d),
          ];
        }),
        'comparison-pairs',
      ),
      h(
        'p',
        { class: 'hint' },
        "For one outlet, Cd·a's En is the sharper test: Cd's uncertainty carries the bore tolerance, which both tests share, counted twice.",
      ),
    );
    comparisonChart(chart, c);
  };
  form.addEventListener('submit', (ev) => {
    ev.preventDefault();
    void show();
  });
  await show();
}
