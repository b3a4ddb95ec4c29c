/**
 * One fit: the readings and the fitted curve, the residuals, Cd by head band, every parameter with
 * its standard uncertainty and 95 % interval, correlations, warnings in plain words, the model
 * comparison; review (approve or reject with a comment), refit, and the report when there is one.
 */
import {
  api,
  ApiError,
  canReview,
  canUpload,
  type DrainTest,
  type Fit,
  type FitPeople,
  type Series,
  type Vessel,
} from '../api.js';
import { fitChart, headBandChart, logChart, residualChart, type WindowPlot } from '../charts.js';
import { field, h, notice, table } from '../dom.js';
import {
  areaMm2,
  clockAt,
  inWords,
  date,
  dateTime,
  decimalsFor,
  displayUnits,
  metres,
  mm,
  num,
  paramName,
  plusMinus,
  seconds,
  termName,
  unitOf,
} from '../format.js';
import type { PageContext } from '../main.js';
import { modelForm, readingForm, windowForm } from '../reading.js';
import { drainTimeWithBudget, drainVesselFromFit } from '../../../server/core/budget/drain-time.js';
import { budgetTableOf } from '../../../server/core/budget/table.js';
import { plainNames } from '../../../server/render/report-words.js';

/** A parameter's value in the unit a person reads it in. */
function scaled(unit: string): { factor: number; unit: string } {
  if (unit === 'm²') return { factor: unitOf('area').perSi, unit: unitOf('area').symbol };
  if (unit === 'm³/s') return { factor: unitOf('flow').perSi, unit: unitOf('flow').symbol };
  if (unit === '1') return { factor: 1, unit: '' };
  return { factor: 1, unit };
}

const pct = (p: number | null | undefined) =>
  p === null || p === undefined ? '—' : p < 0.001 ? '< 0.001' : p.toFixed(3);

/** A time that never wraps (CSS: time { white-space: nowrap }). */
const when = (iso: string | null | undefined, day = false) =>
  iso ? h('time', { datetime: iso }, day ? date(iso) : dateTime(iso)) : '—';

/** Who and when, by name: the test date, the operator, the uploader, who fitted and who reviewed. */
function factsOf(fit: Fit, test: DrainTest, people: FitPeople | null): HTMLElement {
  const item = (label: string, ...value: (Node | string)[]) =>
    h('div', {}, h('dt', {}, label), h('dd', {}, ...value));
  const system = 'the system (demo loader or import)';
  return h(
    'dl',
    { class: 'facts', id: 'fit-facts' },
    item(
      'Tested',
      when(test.testedAt, true),
      test.testedAtSource === 'log' ? ' (from the log’s clock)' : '',
    ),
    item('Operator', test.operator ?? people?.operator ?? 'not stated'),
    ...(test.loggerId ? [item('Logger', test.loggerId)] : []),
    item('Uploaded by', people ? (people.uploadedBy ?? system) : '—', ' on ', when(test.createdAt)),
    item('Fitted by', people ? (people.fittedBy ?? system) : '—', ' on ', when(fit.createdAt)),
    item(
      fit.status === 'rejected' ? 'Rejected by' : 'Approved by',
      ...(fit.status === 'draft'
        ? ['not reviewed yet']
        : [people?.reviewedBy ?? '—', ' on ', when(fit.review?.at)]),
    ),
  );
}

/**
 * The fitted terms besides Cd·a that matter to a reader, as headline cards: a steady inflow (a
 * passing inlet) in L/s, a fitted sensor zero, a fitted head exponent. Expanded uncertainty with k.
 */
function termCards(
  parameters: NonNullable<Fit['result']['parameters']>,
  k: number | null,
): HTMLElement[] {
  const cards: HTMLElement[] = [];
  const U = (u: number | null | undefined) => (u === null || u === undefined ? null : (k ?? 2) * u);
  for (const p of parameters) {
    if (!p.free || p.value === null) continue;
    if (p.name === 'inflowM3S')
      cards.push(
        h(
          'div',
          { class: 'card' },
          h('h2', {}, 'Inflow during the drain'),
          h(
            'p',
            { class: 'value' },
            plusMinus(p.value * 1000, mul(U(p.standardUncertainty), 1000), 'L/s'),
          ),
          h(
            'p',
            { class: 'hint' },
            `a passing inlet or other steady inflow, fitted; ${num(p.value * 3.6e6, 3)} L/h; expanded uncertainty, k = ${num(k ?? 2, 3)}`,
          ),
        ),
      );
    else if (p.name === 'sensorZeroElevationM')
      cards.push(
        h(
          'div',
          { class: 'card' },
          h('h2', {}, 'Sensor zero (fitted)'),
          h(
            'p',
            { class: 'value' },
            plusMinus(p.value * 1000, mul(U(p.standardUncertainty), 1000), 'mm'),
          ),
          h('p', { class: 'hint' }, 'above the vessel’s lowest point, found from the data'),
        ),
      );
    else if (p.name === 'headExponent')
      cards.push(
        h(
          'div',
          { class: 'card' },
          h('h2', {}, 'Head exponent n (fitted)'),
          h('p', { class: 'value' }, plusMinus(p.value, U(p.standardUncertainty))),
          h('p', { class: 'hint' }, '0.5 for an orifice; fitted here from the data'),
        ),
      );
  }
  return cards;
}
const mul = (x: number | null, f: number) => (x === null ? null : x * f);

export async function fitPage({ user, params, main, go }: PageContext): Promise<void> {
  const id = Number(params[0]);
  const fit = await api<Fit>('GET', `/api/fits/${id}`);
  // The report is linked, never probed: a HEAD of report.pdf builds the whole PDF before answering.
  const [vessel, test, siblings, people] = await Promise.all([
    api<Vessel>('GET', `/api/vessels/${fit.vesselId}`),
    api<DrainTest>('GET', `/api/tests/${fit.testId}`),
    api<{ items: Fit[] }>('GET', `/api/tests/${fit.testId}/fits`),
    // names are a courtesy: the page stands without them (an older service has no such route)
    api<FitPeople>('GET', `/api/fits/${id}/people`).catch(() => null),
  ]);
  const r = fit.result;
  // the engine's own flag for a stated window is not always set; the stored settings say it
  const chosenBy = fit.settings.window
    ? `by the person (${fit.settings.window} s)`
    : (r.window.chosenBy ?? 'automatically');
  const cd = r.dischargeCoefficient;
  const ea = r.effectiveAreaM2;
  const outlet = vessel.outlets.find((o) => o.id === fit.outletId);

  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${vessel.id}` }, vessel.name),
      ` › fit ${fit.id}`,
    ),
    h(
      'div',
      { class: 'title-row' },
      h('h1', {}, `Fit ${fit.id} · ${vessel.name}${outlet ? `, outlet ${outlet.key}` : ''}`),
      h('span', { class: `badge badge-${fit.status}` }, fit.status),
    ),
    h(
      'p',
      { class: 'lede' },
      `Logger file ${test.fileName}${test.baro ? ` with barometric log ${test.baro.fileName}` : ''} · engine ${fit.engineVersion}`,
    ),
    factsOf(fit, test, people),
  );
  if (fit.supersededBy !== null)
    main.append(
      notice(
        'info',
        'This fit was replaced by a refit: ',
        h('a', { href: `#/fits/${fit.supersededBy}` }, `open fit ${fit.supersededBy}`),
        '.',
      ),
    );

  // the evidence as uploaded: the stored bytes under their original names (GET /api/tests/:id/raw)
  main.append(
    h(
      'p',
      { class: 'raw-files' },
      'Raw logger file: ',
      h(
        'a',
        { href: `/api/tests/${test.id}/raw`, download: test.fileName, id: 'raw-log' },
        test.fileName,
      ),
      ` (${test.size} bytes, SHA-256 `,
      h('code', { title: test.sha256 }, `${test.sha256.slice(0, 12)}…`),
      ')',
      ...(test.baro
        ? [
            ' · barometric log: ',
            h(
              'a',
              { href: `/api/tests/${test.id}/raw?file=baro`, download: test.baro.fileName },
              test.baro.fileName,
            ),
          ]
        : []),
    ),
  );

  // headline numbers
  const k = cd?.coverageFactor;
  main.append(
    h(
      'section',
      { class: 'headline', 'aria-label': 'Result' },
      h(
        'div',
        { class: 'card big' },
        h('h2', {}, 'Discharge coefficient Cd'),
        h(
          'p',
          { class: 'value' },
          cd
            ? plusMinus(cd.value, cd.expandedUncertainty ?? 2 * (cd.standardUncertainty ?? NaN))
            : 'not available',
        ),
        h(
          'p',
          { class: 'hint' },
          cd
            ? `expanded uncertainty, coverage factor k = ${num(k ?? 2, 3)} (about 95 %); standard uncertainty ${num(cd.standardUncertainty, 2)}; 95 % interval ${num(cd.ci95?.[0], 4)} to ${num(cd.ci95?.[1], 4)}`
            : 'the outlet bore is not known, so only Cd·a is given',
        ),
      ),
      h(
        'div',
        { class: 'card big' },
        h('h2', {}, 'Effective area Cd·a'),
        h(
          'p',
          { class: 'value' },
          areaMm2(ea.value, ea.expandedUncertainty ?? 2 * (ea.standardUncertainty ?? NaN)),
        ),
        h(
          'p',
          { class: 'hint' },
          `expanded uncertainty; 95 % interval ${areaMm2(ea.ci95?.[0] ?? NaN)} to ${areaMm2(ea.ci95?.[1] ?? NaN)}`,
        ),
      ),
      ...termCards(r.parameters ?? [], k ?? null),
      h(
        'div',
        { class: 'card' },
        h('h2', {}, 'Window'),
        h(
          'p',
          {},
          `${num(r.window.startS, 6)} s to ${num(r.window.endS, 6)} s from the first reading`,
        ),
        h(
          'p',
          { class: 'hint' },
          `${seconds(r.window.endS - r.window.startS)} long; ${r.window.samples} readings, chosen ${chosenBy}`,
          ...(r.window.startTime
            ? [' · ', when(r.window.startTime), ' to ', when(r.window.endTime)]
            : []),
        ),
      ),
      h(
        'div',
        { class: 'card' },
        h('h2', {}, 'Scatter about the curve'),
        h('p', {}, `RMS ${mm(r.residuals?.rmseM)}`),
        h(
          'p',
          { class: 'hint' },
          `largest ${mm(r.residuals?.maxAbsM)}; neighbouring residuals correlate ${num(r.residuals?.lag1Autocorrelation, 2)}; ${r.converged ? 'the solver converged' : 'the solver did NOT converge'}`,
        ),
      ),
    ),
  );

  // warnings, in the service's own plain sentences
  main.append(
    h(
      'section',
      {},
      h('h2', {}, 'Warnings'),
      r.warnings.length
        ? h(
            'ul',
            { class: 'warnings' },
            r.warnings.map((w) =>
              h(
                'li',
                {},
                w.stage
                  ? h(
                      'span',
                      { class: 'stage' },
                      `${w.stage === 'reading' ? 'reading the file' : w.stage === 'window' ? 'choosing the window' : w.stage === 'budget' ? 'the uncertainty budget' : 'the fit'}: `,
                    )
                  : null,
                inWords(w.message),
              ),
            ),
          )
        : h('p', {}, 'None: nothing in the reading, the window or the fit called for attention.'),
    ),
  );

  // charts
  const plot = r.plot;
  if (plot) {
    const curve = h('div', { class: 'chart', id: 'fit-chart' });
    const resid = h('div', { class: 'chart', id: 'residual-chart' });
    main.append(
      h(
        'section',
        {},
        h('h2', {}, 'Readings and the fitted drain curve'),
        h(
          'p',
          { class: 'hint' },
          'Dots: readings in the window (thinned for drawing; the fit used every reading). Line: the fitted model.',
        ),
        curve,
      ),
      h(
        'section',
        {},
        h('h2', {}, 'Residuals against time'),
        h(
          'p',
          { class: 'hint' },
          'Reading minus fitted level. A good fit scatters evenly about zero; a slow wander means the model misses something. The band is ±2 × RMS.',
        ),
        resid,
      ),
    );
    fitChart(curve, plot.window as WindowPlot);
    residualChart(resid, plot.window as WindowPlot, r.residuals?.rmseM ?? null);
  }
  if (r.headBands?.length) {
    const box = h('div', { class: 'chart', id: 'band-chart' });
    main.append(
      h(
        'section',
        {},
        h('h2', {}, 'Cd by head band'),
        h(
          'p',
          { class: 'hint' },
          'The window cut into bands of head over the outlet, each fitted alone; bars are ±2 standard uncertainties. A trend with head suggests the outflow law differs from the model.',
        ),
        box,
        table(
          null,
          ['Head from', 'Head to', 'Readings', 'Cd', 'Standard uncertainty'],
          r.headBands.map((b) => [
            metres(b.headFromM, 4),
            metres(b.headToM, 4),
            String(b.samples),
            (b.dischargeCoefficient ?? NaN).toFixed(decimalsFor(b.standardUncertainty ?? NaN)),
            num(b.standardUncertainty, 2),
          ]),
        ),
      ),
    );
    headBandChart(box, r.headBands as Parameters<typeof headBandChart>[1]);
  }

  // the uncertainty budget, then the drain-time calculator from the same budget
  if (r.budget?.table) {
    // made again from the stored lines in the person's units (the same function as the CLI's)
    const t = budgetTableOf(r.budget as Parameters<typeof budgetTableOf>[0], displayUnits());
    main.append(
      h(
        'section',
        { id: 'budget' },
        h('h2', {}, 'Uncertainty budget (JCGM 100:2008)'),
        h(
          'p',
          { class: 'hint' },
          'Every input with its standard uncertainty, sensitivity coefficient and contribution to u(Cd); the same numbers as the text and PDF reports.',
        ),
        table(null, t.columns, t.rows, 'budget'),
        h(
          'ul',
          { class: 'budget-totals' },
          t.totals.map(([k, v]) => h('li', {}, `${k}: ${v}`)),
        ),
        h(
          'details',
          {},
          h('summary', {}, 'How the budget is made'),
          h(
            'ul',
            {},
            r.budget.notes.map((n) => h('li', {}, plainNames(n))),
          ),
        ),
      ),
    );
  }
  const drainModel = drainVesselFromFit(r);
  if (drainModel) {
    const fromIn = h('input', { type: 'number', step: 'any', min: '0', name: 'from', value: '' });
    const toIn = h('input', {
      type: 'number',
      step: 'any',
      min: '0',
      name: 'to',
      value: String(drainModel.vessel.outletElevationM),
    });
    const answer = h('p', { 'aria-live': 'polite', id: 'drain-time-answer' });
    const calc = h(
      'form',
      { class: 'card drain-calc', id: 'drain-calculator' },
      h('h2', {}, 'How long to drain'),
      h(
        'p',
        { class: 'hint' },
        `Levels in metres above the vessel's lowest point; the outlet is at ${drainModel.vessel.outletElevationM} m. No inflow; 95 % interval from this fit's budget.`,
      ),
      field('From level, m', fromIn),
      field('To level, m', toIn),
      h('div', { class: 'actions' }, h('button', { type: 'submit' }, 'Work it out')),
      answer,
    );
    calc.addEventListener('submit', (e) => {
      e.preventDefault();
      try {
        const p = drainTimeWithBudget(
          drainModel.vessel,
          drainModel.lines,
          Number(fromIn.value),
          Number(toIn.value),
        );
        answer.replaceChildren(
          `${num(p.value, 6)} s, about ${(p.value / 60).toFixed(1)} min; 95 % interval ${num(p.ci95[0], 6)} s to ${num(p.ci95[1], 6)} s (k = ${num(p.coverageFactor, 3)})`,
        );
      } catch (err) {
        answer.replaceChildren(notice('error', err instanceof Error ? err.message : String(err)));
      }
    });
    main.append(calc);
  }

  // parameters, correlations, model comparison
  if (r.parameters) {
    main.append(
      h(
        'section',
        {},
        h('h2', {}, 'Parameters'),
        table(
          null,
          ['Parameter', 'Value', 'Standard uncertainty', '95 % interval', 'Fitted or fixed'],
          r.parameters.map((p) => {
            const s = scaled(p.unit);
            const u = p.standardUncertainty;
            const d = u ? decimalsFor(u * s.factor) : 4;
            const unit = s.unit ? ` ${s.unit}` : '';
            return [
              paramName(p.name),
              `${u ? ((p.value ?? NaN) * s.factor).toFixed(d) : num((p.value ?? NaN) * s.factor, 5)}${unit}`,
              u === null ? '—' : `${num(u * s.factor, 2)}${unit}`,
              p.ci95 && p.free
                ? `${((p.ci95[0] ?? NaN) * s.factor).toFixed(d)} to ${((p.ci95[1] ?? NaN) * s.factor).toFixed(d)}${unit}`
                : '—',
              p.free ? (p.atBound ? 'fitted (at its limit)' : 'fitted') : 'fixed',
            ];
          }),
        ),
      ),
    );
  }
  if (r.correlations && r.correlations.parameters.length > 1) {
    const names = r.correlations.parameters;
    main.append(
      h(
        'section',
        {},
        h('h2', {}, 'Correlations between fitted parameters'),
        h('p', { class: 'hint' }, 'Near ±1: the data cannot tell the two apart well.'),
        table(
          null,
          ['', ...names.map(paramName)],
          names.map((n, i) => [
            paramName(n),
            ...r.correlations!.matrix[i].map((c) =>
              h(
                'span',
                {
                  class:
                    c !== null && Math.abs(c) > 0.95 && i !== r.correlations!.matrix[i].indexOf(c)
                      ? 'strong-corr'
                      : '',
                },
                c === null ? '—' : c.toFixed(3),
              ),
            ),
          ]),
          'corr',
        ),
      ),
    );
  }
  if (r.modelComparison) {
    const mc = r.modelComparison;
    main.append(
      h(
        'section',
        {},
        h('h2', {}, 'Model comparison'),
        h(
          'p',
          {},
          `Chosen model: ${mc.chosen.model} (${mc.chosen.parameters} fitted parameters). ${mc.basis ?? ''}`,
        ),
        table(
          null,
          ['Term', 'Compared model', 'Change in AIC', 'F-test p', 'In words'],
          mc.rows.map((row) => {
            const earned = row.fTest ? (row.fTest.pValue ?? 1) < 0.05 : false;
            const words =
              row.change === 'with'
                ? earned && (row.deltaAic ?? 0) < -2
                  ? `adding the ${termName(row.term)} is supported by the data`
                  : `the ${termName(row.term)} is not needed`
                : earned
                  ? `the ${termName(row.term)} is earned: keep it`
                  : `the ${termName(row.term)} is not supported by the data`;
            return [
              `${row.change} ${termName(row.term)}`,
              row.model,
              row.deltaAic === null ? '—' : row.deltaAic.toFixed(1),
              pct(row.fTest?.pValue),
              words,
            ];
          }),
        ),
      ),
    );
  }

  // the window on the whole log, and how it was cut
  const logBox = h('div', { class: 'chart', id: 'window-chart' });
  const trims = r.window.trims ?? [];
  const windowSection = h(
    'section',
    {},
    h('h2', {}, 'The window on the whole log'),
    logBox,
    trims.length
      ? h(
          'ul',
          {},
          trims.map((t) =>
            h(
              'li',
              {},
              `${(t.fromS ?? NaN).toFixed(1)} s to ${(t.toS ?? NaN).toFixed(1)} s left out: ${t.reason}`,
            ),
          ),
        )
      : null,
    h(
      'details',
      {},
      h('summary', {}, 'How the window was chosen'),
      h(
        'ul',
        {},
        (r.window.notes ?? []).map((n) => h('li', {}, n.message)),
      ),
    ),
  );
  main.append(windowSection);
  let series: Series | null = null;
  try {
    series = (await api<{ series: Series }>('GET', `/api/tests/${fit.testId}/series?fit=${fit.id}`))
      .series;
  } catch (e) {
    if (!(e instanceof ApiError) || e.status !== 404) throw e; // no full-resolution route: draw the stored thinned log
  }
  const t0 = series?.t0 ?? r.read?.t0 ?? null;
  const win = windowForm((s) => clockAt(t0, s), 'Window of this fit');
  const lc = logChart(
    logBox,
    series?.timeS ?? plot?.log.timeS ?? [],
    series?.levelM ?? (plot?.log.levelM as number[] | undefined) ?? [],
    r.window,
    canUpload(user)
      ? (a, b) => {
          win.set(a, b, true);
          lc.setWindow(a, b);
        }
      : undefined,
  );
  win.onChange((a, b) => lc.setWindow(a, b));
  win.set(r.window.startS, r.window.endS, false);

  // review
  if (canReview(user) && fit.status === 'draft' && fit.supersededBy === null) {
    const comment = h('textarea', { name: 'comment', rows: 3, maxlength: 10000 });
    const out = h('div', { 'aria-live': 'polite' });
    const decide = (decision: 'approve' | 'reject') => async () => {
      try {
        await api('POST', `/api/fits/${id}/review`, {
          decision,
          comment: comment.value.trim() || undefined,
        });
        go(`#/fits/${id}`);
      } catch (e) {
        out.replaceChildren(notice('error', e instanceof Error ? e.message : String(e)));
      }
    };
    const approve = h('button', { type: 'button', class: 'primary' }, 'Approve');
    const reject = h('button', { type: 'button', class: 'danger' }, 'Reject');
    approve.addEventListener('click', decide('approve'));
    reject.addEventListener('click', decide('reject'));
    main.append(
      h(
        'section',
        { class: 'card review' },
        h('h2', {}, 'Review'),
        field('Comment (kept with the fit)', comment),
        h('div', { class: 'actions' }, approve, reject),
        out,
      ),
    );
  } else if (fit.review?.at) {
    main.append(
      h(
        'section',
        { class: 'card review' },
        h('h2', {}, 'Review'),
        h(
          'p',
          {},
          `${fit.status}${people?.reviewedBy ? ` by ${people.reviewedBy}` : ''} on `,
          when(fit.review.at),
        ),
        fit.review.selfReview
          ? notice(
              'caution',
              'Self-review: approved by the person who uploaded the test or asked for this fit (allowed for this site by an admin; four eyes waived).',
            )
          : null,
        fit.review.comment ? h('blockquote', {}, fit.review.comment) : null,
      ),
    );
  }

  // refit
  if (canUpload(user) && fit.supersededBy === null) {
    const sensor = (fit.vessel.sensor ?? {}) as Record<string, unknown>;
    const model = modelForm(
      fit.settings,
      typeof sensor.zeroElevationM !== 'number' && typeof sensor.mountElevationM !== 'number',
    );
    const reading = readingForm(fit.settings);
    const out = h('div', { 'aria-live': 'polite' });
    const button = h('button', { type: 'submit' }, 'Fit again');
    const form = h(
      'form',
      { class: 'card refit' },
      h('h2', {}, 'Fit again with another window or model'),
      h(
        'p',
        { class: 'hint' },
        'Drag across the chart above or type the times. The present fit is kept and marked as replaced.',
      ),
      win.el,
      model.el,
      h('details', {}, h('summary', {}, 'Reading settings'), reading.el),
      h('div', { class: 'actions' }, button, out),
    );
    form.addEventListener('submit', async (e) => {
      e.preventDefault();
      button.disabled = true;
      out.replaceChildren(h('p', {}, 'Fitting…'));
      const settings = {
        ...reading.values(),
        ...model.values(),
        ...(win.value() ? { window: win.value() } : {}),
      };
      try {
        const f = await api<Fit>('POST', `/api/fits/${id}/refit`, { settings });
        go(`#/fits/${f.id}`);
      } catch (err) {
        out.replaceChildren(
          notice('error', `Not fitted: ${err instanceof Error ? err.message : String(err)}`),
        );
        button.disabled = false;
      }
    });
    windowSection.after(form);
  }

  // the report, and the other fits of the same test
  main.append(
    h(
      'section',
      {},
      h('h2', {}, 'Report'),
      h(
        'p',
        {},
        h(
          'a',
          { href: `/api/fits/${id}/report.pdf`, class: 'button' },
          'Download the report (PDF)',
        ),
        ' ',
        h(
          'span',
          { class: 'hint' },
          'built when you ask for it; a long report may take a few seconds',
        ),
      ),
    ),
    h(
      'section',
      {},
      h('h2', {}, 'Fits of this test'),
      table(
        null,
        ['Fit', 'Made', 'Window', 'Cd', 'State'],
        siblings.items.map((s) => [
          s.id === id ? `${s.id} (this one)` : h('a', { href: `#/fits/${s.id}` }, String(s.id)),
          when(s.createdAt),
          `${num(s.result.window.startS, 5)} s to ${num(s.result.window.endS, 5)} s`,
          s.result.dischargeCoefficient ? s.result.dischargeCoefficient.value.toFixed(4) : '—',
          `${s.status}${s.supersededBy !== null ? ', replaced' : ''}`,
        ]),
      ),
    ),
  );
}
