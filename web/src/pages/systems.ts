/**
 * Connected vessels: a system file and one level log per vessel → the joint fit of every
 * outlet's Cd·a (POST /api/systems/fit); then an operating point (inflow) → steady levels and
 * the linear model (POST /api/systems/steady, /linearize). Nothing is stored by the service:
 * the fit can be saved as a JSON file and opened here again in place of the system file.
 */
import { api, ApiError, canUpload } from '../api.js';
import { fitChart } from '../charts.js';
import { append as appendKids, field, h, notice, table } from '../dom.js';
import { area, decimalsFor, flow, num, plusMinus, seconds } from '../format.js';
import type { PageContext } from '../main.js';
import type { JointFitResult } from '../../../server/core/fit-result/schema.js';
import { schematicVessels, systemSchematic } from '../schematic.js';

/** The joint fit as the service sends it: the one fit-result shape (type-only) plus the drawing. */
type SystemFit = JointFitResult & {
  drawing?: {
    id: string;
    fileName: string;
    timeS: number[];
    levelM: number[];
    fittedM: number[];
  }[];
};
interface Est {
  value: number;
  standardUncertainty: number | null;
  ci95: [number, number] | null;
}
interface Steady {
  inflowM3S: Record<string, number>;
  vessels: Record<string, { levelM: Est; headM: number; outflowM3S: number; heightM: number }>;
  uncertainty: string;
  warnings: string[];
}
interface Linear {
  ids: string[];
  operatingLevelsM: number[];
  a: Est[];
  b: Est[];
  timeConstantsS: Est[];
  modeTimeConstantsS: number[];
  text: string;
  csv: string;
}

/** Parameter names from the fit ("FT1.effectiveAreaM2") in words. */
function paramWords(name: string): string {
  const [id, key] = name.split('.');
  const words: Record<string, string> = {
    effectiveAreaM2: 'Cd·a',
    initialReadingM: 'first level',
    sensorZeroElevationM: 'sensor zero',
    leakInflowM3S: 'inflow',
  };
  return `${id} ${words[key] ?? key ?? ''}`.trim();
}

function estimate(e: Est, unit: string, scale = 1): string {
  return e.standardUncertainty === null
    ? `${num(e.value * scale, 4)} ${unit}`
    : plusMinus(e.value * scale, e.standardUncertainty * scale, unit);
}

function download(name: string, text: string, type: string): HTMLAnchorElement {
  return h(
    'a',
    { href: URL.createObjectURL(new Blob([text], { type })), download: name, class: 'button' },
    `Save ${name}`,
  );
}

export async function systemsPage({ user, main }: PageContext): Promise<void> {
  main.append(
    h('h1', {}, 'Connected vessels'),
    h(
      'p',
      { class: 'lede' },
      'Vessels whose outlets discharge into one another, tested together: fit every outlet’s effective area Cd·a at once from one level log per vessel, then find the steady levels and the linear model at an inflow. Nothing is kept by the service: save the fit as a file to come back to it.',
    ),
    notice(
      'caution',
      'Drain tests of connected vessels mean several open outlets at once and discharges to drains: follow site procedures. The numbers are engineering estimates with stated uncertainty, not a certification.',
    ),
  );
  const systemInput = h('input', {
    type: 'file',
    name: 'system',
    accept: '.json,application/json',
  });
  const logsBox = h('div', { class: 'grid system-logs' });
  const fitDatum = h('input', { type: 'checkbox', name: 'fitDatum', id: 'sys-fit-datum' });
  const fitInflow = h('input', { type: 'checkbox', name: 'fitInflow', id: 'sys-fit-inflow' });
  const fitButton = h(
    'button',
    { type: 'submit', class: 'primary', disabled: true },
    'Fit all outlets together',
  );
  const status = h('div', { 'aria-live': 'polite' });
  const schematicBox = h('figure', { class: 'card schematic' });
  const results = h('div', { class: 'system-results' });
  const operating = h('div', { class: 'system-operating' });
  const form = h(
    'form',
    { class: 'system-form' },
    h(
      'fieldset',
      {},
      h('legend', {}, 'System and logs'),
      field(
        'System file',
        systemInput,
        'The vessels, where each outlet discharges to (free jet or submerged), and their elevations; or a saved fit of this page',
      ),
      logsBox,
      canUpload(user)
        ? h(
            'div',
            {},
            h(
              'div',
              { class: 'check' },
              fitDatum,
              h('label', { for: fitDatum.id }, 'Fit each sensor’s zero'),
              h('span', { class: 'hint' }, 'when a sensor zero is not known'),
            ),
            h(
              'div',
              { class: 'check' },
              fitInflow,
              h('label', { for: fitInflow.id }, 'Fit a steady inflow into each vessel'),
              h('span', { class: 'hint' }, 'a passing inlet valve during the test'),
            ),
            h('div', { class: 'actions' }, fitButton),
          )
        : h(
            'p',
            { class: 'hint' },
            'Your role may not run a fit; open a saved fit, or a system file that states each outlet’s Cd·a, to work out an operating point.',
          ),
    ),
    status,
  );
  main.append(form, schematicBox, results, operating);

  let system: Record<string, unknown> | null = null;
  let fitted: SystemFit | null = null;
  const logInputs = new Map<string, HTMLInputElement>();
  const drawSchematic = (levels: Record<string, number> | null) => {
    if (!system) return;
    schematicBox.replaceChildren(
      systemSchematic(schematicVessels(system), levels),
      h(
        'figcaption',
        {},
        'Heights and widths to one scale; elevations on the site datum. Dashed arrow: free jet (the receiver’s level does not act back); solid: submerged pipe (both levels count).',
      ),
    );
  };

  systemInput.addEventListener('change', async () => {
    status.replaceChildren();
    results.replaceChildren();
    operating.replaceChildren();
    logsBox.replaceChildren();
    logInputs.clear();
    fitted = null;
    const f = systemInput.files?.[0];
    if (!f) return;
    let doc: Record<string, unknown>;
    try {
      doc = JSON.parse(await f.text());
    } catch {
      status.append(notice('error', `${f.name} is not JSON: choose a system file or a saved fit`));
      return;
    }
    if (doc.format === 'efflux-system-fit') {
      fitted = doc as unknown as SystemFit;
      system = fitted.system as Record<string, unknown>;
      drawSchematic(null);
      showFit(fitted);
      return;
    }
    system = doc;
    const vessels = Array.isArray(doc.vessels) ? (doc.vessels as Record<string, unknown>[]) : [];
    for (const v of vessels) {
      const input = h('input', {
        type: 'file',
        name: `log:${String(v.id)}`,
        accept: '.csv,.txt,.tsv,text/*',
      });
      logInputs.set(String(v.id), input);
      input.addEventListener(
        'change',
        () => (fitButton.disabled = [...logInputs.values()].some((i) => !i.files?.length)),
      );
      logsBox.append(field(`Level log of ${String(v.name ?? v.id)} (${String(v.id)})`, input));
    }
    drawSchematic(null);
    showOperating();
  });

  form.addEventListener('submit', async (ev) => {
    ev.preventDefault();
    const f = systemInput.files?.[0];
    if (!f || !system) return;
    const body = new FormData();
    body.append('system', f, f.name);
    for (const [id, input] of logInputs)
      if (input.files?.[0]) body.append(`log:${id}`, input.files[0], input.files[0].name);
    if (fitDatum.checked) body.append('fitDatum', 'true');
    if (fitInflow.checked) body.append('fitInflow', 'true');
    fitButton.disabled = true;
    status.replaceChildren(notice('info', 'Fitting every outlet at once…'));
    try {
      fitted = await api<SystemFit>('POST', '/api/systems/fit', body);
      status.replaceChildren();
      showFit(fitted);
    } catch (e) {
      status.replaceChildren(notice('error', e instanceof ApiError ? e.message : String(e)));
    } finally {
      fitButton.disabled = false;
    }
  });

  function showFit(fit: SystemFit): void {
    results.replaceChildren();
    const names = fit.correlations.parameters;
    const k = (Object.values(fit.outlets)[0]?.dischargeCoefficient?.coverageFactor ?? 2).toFixed(2);
    append(
      results,
      h('h2', {}, 'Joint fit'),
      h(
        'p',
        { class: 'headline-line' },
        fit.converged
          ? `Converged (${fit.solver.stopReason}). `
          : `Did not converge (${fit.solver.stopReason}). `,
        `Common span of the logs ${seconds((fit.diagnostics as { alignment: { spanS: number } }).alignment.spanS)}; ${num(fit.degreesOfFreedom, 4)} effective degrees of freedom.`,
      ),
      fit.warnings.length
        ? h(
            'ul',
            { class: 'warnings' },
            fit.warnings.map((w) => h('li', {}, w.message)),
          )
        : null,
      table(
        'Outlets',
        [
          'Outlet',
          'Effective area Cd·a ± standard uncertainty',
          'Cd ± expanded uncertainty',
          `Cd 95 % interval (k = ${k})`,
        ],
        Object.entries(fit.outlets).map(([id, o]) => [
          id,
          area(o.effectiveAreaM2.value, o.effectiveAreaM2.standardUncertainty ?? null),
          o.dischargeCoefficient
            ? plusMinus(
                o.dischargeCoefficient.value,
                o.dischargeCoefficient.expandedUncertainty ??
                  2 * (o.dischargeCoefficient.standardUncertainty ?? NaN),
              )
            : '—',
          o.dischargeCoefficient?.ci95
            ? `${(o.dischargeCoefficient.ci95[0] ?? NaN).toFixed(4)} to ${(o.dischargeCoefficient.ci95[1] ?? NaN).toFixed(4)}`
            : '—',
        ]),
        'system-outlets',
      ),
      table(
        'Logs',
        [
          'Vessel',
          'Logger file',
          'Readings used',
          'Noise (standard deviation)',
          'Lag-1 autocorrelation',
        ],
        fit.residuals.map((v) => [
          v.id,
          v.fileName,
          String(v.samples),
          `${(Number(v.noiseM) * 1000).toFixed(2)} mm`,
          v.lag1Autocorrelation === null ? '—' : v.lag1Autocorrelation.toFixed(2),
        ]),
      ),
      h('h3', {}, 'Correlations between the fitted parameters'),
      h(
        'p',
        { class: 'hint' },
        'Near ±1: the logs barely tell the two apart. Marked red past ±0.95.',
      ),
      h(
        'div',
        { class: 'table-wrap' },
        table(
          null,
          ['', ...names.map(paramWords)],
          fit.correlations.matrix.map((row, i) => [
            h('strong', {}, paramWords(names[i])),
            ...row.map((r, j) =>
              h(
                'span',
                { class: r !== null && i !== j && Math.abs(r) > 0.95 ? 'strong-corr' : '' },
                r === null ? '—' : r.toFixed(3),
              ),
            ),
          ]),
          'corr',
        ),
      ),
    );
    if (fit.drawing) {
      results.append(h('h3', {}, 'Each log and its fitted curve'));
      const grid = h('div', { class: 'system-charts' });
      results.append(grid);
      for (const d of fit.drawing) {
        const box = h('div', {
          class: 'chart',
          id: `system-fit-${d.id}`,
          role: 'img',
          'aria-label': `Level of ${d.id} and the fitted curve`,
        });
        grid.append(h('div', {}, h('h4', {}, `${d.id} · ${d.fileName}`), box));
        requestAnimationFrame(() =>
          fitChart(
            box,
            { offsetS: 0, timeS: d.timeS, observedM: d.levelM, fittedM: d.fittedM },
            'time from the logs’ common start (min)',
          ),
        );
      }
    }
    const { drawing: _drop, ...keep } = fit;
    void _drop;
    results.append(
      h(
        'div',
        { class: 'actions' },
        download('system-fit.json', JSON.stringify(keep, null, 2), 'application/json'),
        h(
          'span',
          { class: 'hint' },
          'the same document as efflux fit-system --json; open it here again, or give it to efflux steady and linearize',
        ),
      ),
    );
    showOperating();
  }

  function showOperating(): void {
    operating.replaceChildren();
    if (!system) return;
    const vessels = (system.vessels as Record<string, unknown>[]).map((v) => String(v.id));
    const receivers = new Set(
      (system.vessels as Record<string, unknown>[]).map((v) => v.dischargesTo).filter(Boolean),
    );
    const inputs = new Map<string, HTMLInputElement>();
    const constant = Array.isArray(system.inflows)
      ? (system.inflows as { to: string; constant?: number | string }[])
      : [];
    for (const id of vessels) {
      const given = constant.find((c) => c.to === id && c.constant !== undefined)?.constant;
      const value =
        given !== undefined
          ? typeof given === 'number'
            ? `${num(given * 1000, 4)} L/s`
            : given
          : !receivers.has(id)
            ? '2.5 L/s'
            : '';
      inputs.set(
        id,
        h('input', { type: 'text', name: `inflow-${id}`, value, placeholder: '0 L/s', size: 10 }),
      );
    }
    const go = h('button', { type: 'submit', class: 'primary' }, 'Work out the operating point');
    const out = h('div', { 'aria-live': 'polite' });
    const form = h(
      'form',
      { class: 'operating-form' },
      h(
        'fieldset',
        {},
        h('legend', {}, 'Operating point'),
        h(
          'p',
          { class: 'hint' },
          'Steady inflow into each vessel, with its unit (L/s, m3/h, m3/s, gpm); empty means none.',
        ),
        h(
          'div',
          { class: 'grid' },
          [...inputs].map(([id, i]) => field(`Inflow into ${id}`, i)),
        ),
        h('div', { class: 'actions' }, go),
      ),
      out,
    );
    operating.append(h('h2', {}, 'Steady levels and the linear model'), form);
    form.addEventListener('submit', async (ev) => {
      ev.preventDefault();
      out.replaceChildren();
      const inflows = [...inputs]
        .filter(([, i]) => i.value.trim())
        .map(([to, i]) => ({ to, flow: i.value.trim() }));
      const doc = fitted ? (({ drawing: _d, ...rest }) => rest)(fitted) : system!;
      go.disabled = true;
      try {
        const [s, lm] = await Promise.all([
          api<Steady>('POST', '/api/systems/steady', { system: doc, inflows }),
          api<Linear>('POST', '/api/systems/linearize', { system: doc, inflows }),
        ]);
        showSteady(out, s, lm);
        drawSchematic(
          Object.fromEntries(Object.entries(s.vessels).map(([id, v]) => [id, v.levelM.value])),
        );
      } catch (e) {
        out.append(notice('error', e instanceof ApiError ? e.message : String(e)));
      } finally {
        go.disabled = false;
      }
    });
  }
}

function showSteady(out: HTMLElement, s: Steady, lm: Linear): void {
  const n = lm.ids.length;
  // the service already warns of most overflows in words; add a notice only for those it did not name
  const over = Object.entries(s.vessels).filter(
    ([id, v]) => v.levelM.value > v.heightM && !s.warnings.some((w) => w.startsWith(`${id}:`)),
  );
  append(
    out,
    ...over.map(([id, v]) =>
      notice(
        'error',
        `${id} overflows at this inflow: its steady level ${num(v.levelM.value, 4)} m is above its height ${num(v.heightM, 4)} m.`,
      ),
    ),
    s.warnings.length
      ? notice(
          'error',
          h(
            'ul',
            { class: 'warnings' },
            s.warnings.map((w) => h('li', {}, w)),
          ),
        )
      : null,
    table(
      'Steady state',
      [
        'Vessel',
        'Inflow',
        'Level above its bottom ± standard uncertainty',
        '95 % interval',
        'Head over the outlet',
        'Outflow',
        'Vessel height',
      ],
      Object.entries(s.vessels).map(([id, v]) => [
        id,
        flow(s.inflowM3S[id] ?? 0),
        estimate(v.levelM, 'm'),
        interval(v.levelM, 'm'),
        `${num(v.headM, 4)} m`,
        flow(v.outflowM3S),
        h(
          'span',
          { class: v.levelM.value > v.heightM ? 'strong-corr' : '' },
          `${num(v.heightM, 4)} m`,
        ),
      ]),
      'steady-table',
    ),
    h('p', { class: 'hint' }, `Uncertainty: ${s.uncertainty}.`),
    h('h3', {}, 'Linear model about this operating point'),
    h(
      'p',
      { class: 'hint' },
      'dx/dt = A·x + B·u, y = x: x the level deviations (m), u the extra inflows (m³/s).',
    ),
    h(
      'div',
      { class: 'matrices' },
      matrix('A (1/s)', lm.ids, lm.ids, lm.a, n),
      matrix(
        'B (1/m²)',
        lm.ids,
        lm.ids.map((i) => `inflow ${i}`),
        lm.b,
        n,
      ),
    ),
    table(
      'Time constants',
      ['Vessel', 'Own time constant ± standard uncertainty', '95 % interval'],
      lm.ids.map((id, i) => [
        id,
        estimate(lm.timeConstantsS[i], 's'),
        interval(lm.timeConstantsS[i], 's'),
      ]),
      'tau-table',
    ),
    h(
      'p',
      {},
      `Coupled modes (−1/Re λ of A): ${lm.modeTimeConstantsS.map((t) => `${t.toFixed(1)} s`).join(', ')}.`,
    ),
  );
  const pre = h('pre', { class: 'model-text', id: 'model-text' }, lm.text);
  const copy = h('button', { type: 'button' }, 'Copy the text block');
  const copied = h('span', { class: 'hint', 'aria-live': 'polite' });
  copy.addEventListener('click', async () => {
    try {
      await navigator.clipboard.writeText(lm.text);
      copied.textContent = 'copied';
    } catch {
      // no clipboard permission: select the text so Ctrl+C works
      const r = document.createRange();
      r.selectNodeContents(pre);
      getSelection()?.removeAllRanges();
      getSelection()?.addRange(r);
      copied.textContent = 'selected: press Ctrl+C';
    }
  });
  out.append(
    h('h3', {}, 'Text block for a script or a design note'),
    pre,
    h('div', { class: 'actions' }, copy, download('linear-model.csv', lm.csv, 'text/csv'), copied),
  );
}

function matrix(
  caption: string,
  rows: string[],
  cols: string[],
  e: Est[],
  n: number,
): HTMLTableElement {
  return table(
    caption,
    ['', ...cols],
    rows.map((r, i) => [
      h('strong', {}, r),
      ...cols.map((_, j) => {
        const x = e[i * n + j];
        return x.standardUncertainty
          ? `${num(x.value, 4)} ± ${num(x.standardUncertainty, 2)}`
          : num(x.value, 4);
      }),
    ]),
    'matrix',
  );
}

function append(el: HTMLElement, ...kids: (Node | string | null)[]): void {
  appendKids(el, kids);
}

/** A 95 % interval with the digits its uncertainty earns. */
function interval(e: Est, unit: string): string {
  if (!e.ci95) return '—';
  const d = decimalsFor(e.standardUncertainty ?? 0);
  return `${e.ci95[0].toFixed(d)} to ${e.ci95[1].toFixed(d)} ${unit}`;
}
