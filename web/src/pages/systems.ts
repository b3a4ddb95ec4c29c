/**
 * Connected vessels: a system file, one level log per vessel and one flow log per logged inflow →
 * the joint fit of every outlet's Cd·a, kept as a draft record (POST /api/systems/fits) or only
 * tried (POST /api/systems/fit); the kept fits of the system listed with approve/reject for a
 * second person and the PDF report; then an operating point (inflow) → steady levels and the
 * linear model (POST /api/systems/steady, /linearize). The operating point starts from the
 * logged inflow's average over the test, or from the system file's constant inflows; otherwise
 * the page asks for it (no made-up default).
 */
import { api, ApiError, canReview, canUpload, type User } from '../api.js';
import { fitChart, residualChart } from '../charts.js';
import { append as appendKids, field, h, notice, table } from '../dom.js';
import { area, dateTime, decimalsFor, flow, num, plusMinus, seconds } from '../format.js';
import type { PageContext } from '../main.js';
import type { JointFitResult } from '../../../server/core/fit-result/schema.js';
import { plainProblem } from '../problem-words.js';
import { schematicVessels, systemSchematic, untangleLabels } from '../schematic.js';

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
/** A kept joint fit (GET /api/systems/fits/:id). */
interface StoredJointFit {
  id: number;
  site: string;
  systemName: string;
  status: 'draft' | 'approved' | 'rejected';
  createdAt: string;
  createdBy: string | null;
  reviewedBy: string | null;
  reviewedAt: string | null;
  result: JointFitResult;
  drawing: NonNullable<SystemFit['drawing']>;
  review: { comment: string | null; selfReview: boolean } | null;
}
type JointFitSummary = Omit<StoredJointFit, 'result' | 'drawing' | 'review'>;

/** The logged inflows of a fit: vessel id → average over the test, m³/s. */
function loggedInflowAverages(fit: JointFitResult | null): Map<string, number> {
  const logs =
    (fit?.diagnostics as { inflowLogs?: { to: string; meanM3S?: number }[] } | undefined)
      ?.inflowLogs ?? [];
  return new Map(
    logs.filter((l) => typeof l.meanM3S === 'number').map((l) => [l.to, l.meanM3S as number]),
  );
}

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
      'Vessels whose outlets discharge into one another, tested together: fit every outlet’s effective area Cd·a at once from one level log per vessel (and the flow log of a logged inflow), keep the fit as a record for a second person to approve, then find the steady levels and the linear model at an inflow.',
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
  const siteBox = h('div', {});
  const fitDatum = h('input', { type: 'checkbox', name: 'fitDatum', id: 'sys-fit-datum' });
  const fitInflow = h('input', { type: 'checkbox', name: 'fitInflow', id: 'sys-fit-inflow' });
  const notes = h('input', { type: 'text', name: 'notes', maxlength: 2000 });
  const fitButton = h(
    'button',
    { type: 'submit', class: 'primary', disabled: true },
    'Fit all outlets together and keep the fit',
  );
  const tryButton = h(
    'button',
    { type: 'button', disabled: true },
    'Try the fit without keeping it',
  );
  const status = h('div', { 'aria-live': 'polite' });
  const schematicBox = h('figure', { class: 'card schematic' });
  const kept = h('section', { class: 'system-kept', 'aria-label': 'Kept fits' });
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
        'The vessels, where each outlet discharges to (free jet or submerged), their elevations and inflows; or a fit saved from this page',
      ),
      logsBox,
      siteBox,
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
            field('Notes for the record', notes, 'optional: what the reviewer should know'),
            h('div', { class: 'actions' }, fitButton, tryButton),
          )
        : h(
            'p',
            { class: 'hint' },
            'Your role may not run a fit; open a kept fit below, a saved fit, or a system file that states each outlet’s Cd·a, to work out an operating point.',
          ),
    ),
    status,
  );
  main.append(form, schematicBox, kept, results, operating);

  let system: Record<string, unknown> | null = null;
  let fitted: SystemFit | null = null;
  const logInputs = new Map<string, HTMLInputElement>();
  const siteInput = h('input', { type: 'text', name: 'site', maxlength: 200 });
  const vesselNames = () =>
    (Array.isArray(system?.vessels) ? (system!.vessels as Record<string, unknown>[]) : []).map(
      (v) => ({ id: String(v.id), name: String(v.name ?? v.id) }),
    );
  const drawSchematic = (levels: Record<string, number> | null) => {
    if (!system) return;
    const drawing = systemSchematic(schematicVessels(system), levels);
    schematicBox.replaceChildren(
      drawing,
      h(
        'figcaption',
        {},
        'Heights and widths to one scale; elevations on the site datum. Dashed arrow: free jet (the receiver’s level does not act back); solid: submerged pipe (both levels count).',
      ),
    );
    untangleLabels(drawing);
  };
  const ready = () => {
    const missing = [...logInputs.values()].some((i) => !i.files?.length);
    fitButton.disabled = missing;
    tryButton.disabled = missing;
  };

  systemInput.addEventListener('change', async () => {
    status.replaceChildren();
    results.replaceChildren();
    operating.replaceChildren();
    logsBox.replaceChildren();
    siteBox.replaceChildren();
    logInputs.clear();
    fitted = null;
    const f = systemInput.files?.[0];
    if (!f) return;
    let doc: Record<string, unknown>;
    try {
      doc = JSON.parse(await f.text());
    } catch {
      status.append(
        notice('error', `System file: ${f.name} is not JSON; choose a system file or a saved fit`),
      );
      return;
    }
    if (doc.format === 'efflux-system-fit') {
      fitted = doc as unknown as SystemFit;
      system = fitted.system as Record<string, unknown>;
      drawSchematic(null);
      showFit(fitted);
      void showKept();
      return;
    }
    system = doc;
    const vessels = vesselNames();
    for (const v of vessels) {
      const input = h('input', {
        type: 'file',
        name: `log:${v.id}`,
        accept: '.csv,.txt,.tsv,text/*',
      });
      logInputs.set(`log:${v.id}`, input);
      input.addEventListener('change', ready);
      logsBox.append(field(`Level log of ${v.name} (${v.id})`, input));
    }
    // a logged inflow (a pump's flow meter): its file is named in the system file
    const inflows = Array.isArray(doc.inflows) ? (doc.inflows as Record<string, unknown>[]) : [];
    for (const inflow of inflows) {
      if (typeof inflow.log !== 'string') continue;
      const to = String(inflow.to);
      const input = h('input', {
        type: 'file',
        name: `inflow:${to}`,
        accept: '.csv,.txt,.tsv,text/*',
      });
      logInputs.set(`inflow:${to}`, input);
      input.addEventListener('change', ready);
      const v = vessels.find((x) => x.id === to);
      logsBox.append(
        field(
          `Inflow log into ${v ? `${v.name} (${v.id})` : to}`,
          input,
          `the flow log the system file names: ${inflow.log}`,
        ),
      );
    }
    if (typeof doc.site !== 'string' && canUpload(user))
      siteBox.append(
        field('Site', siteInput, 'the system file names no site: the site the fit belongs to'),
      );
    ready();
    drawSchematic(null);
    showOperating();
    void showKept();
  });

  function fitForm(): FormData | null {
    const f = systemInput.files?.[0];
    if (!f || !system) return null;
    const body = new FormData();
    body.append('system', f, f.name);
    for (const [name, input] of logInputs)
      if (input.files?.[0]) body.append(name, input.files[0], input.files[0].name);
    if (fitDatum.checked) body.append('fitDatum', 'true');
    if (fitInflow.checked) body.append('fitInflow', 'true');
    return body;
  }

  async function runFit(keep: boolean): Promise<void> {
    const body = fitForm();
    if (!body) return;
    if (keep) {
      if (siteInput.isConnected && siteInput.value.trim())
        body.append('site', siteInput.value.trim());
      if (notes.value.trim()) body.append('notes', notes.value.trim());
    }
    fitButton.disabled = true;
    tryButton.disabled = true;
    status.replaceChildren(notice('info', 'Fitting every outlet at once…'));
    try {
      if (keep) {
        const stored = await api<StoredJointFit>('POST', '/api/systems/fits', body);
        status.replaceChildren(
          notice(
            'info',
            `Kept as joint fit ${stored.id}, a draft: another engineer approves or rejects it below.`,
          ),
        );
        fitted = { ...stored.result, drawing: stored.drawing };
        showFit(fitted, stored);
        void showKept();
      } else {
        fitted = await api<SystemFit>('POST', '/api/systems/fit', body);
        status.replaceChildren(notice('info', 'Tried only: this fit is not kept.'));
        showFit(fitted);
      }
    } catch (e) {
      status.replaceChildren(notice('error', plainProblem(e, vesselNames())));
    } finally {
      ready();
    }
  }
  form.addEventListener('submit', (ev) => {
    ev.preventDefault();
    void runFit(true);
  });
  tryButton.addEventListener('click', () => void runFit(false));

  /** The kept fits of this system (or of every system before one is chosen), newest first. */
  async function showKept(): Promise<void> {
    const name = typeof system?.name === 'string' ? system.name : null;
    let list: { items: JointFitSummary[] };
    try {
      list = await api<{ items: JointFitSummary[] }>(
        'GET',
        `/api/systems/fits${name ? `?system=${encodeURIComponent(name)}` : ''}`,
      );
    } catch (e) {
      kept.replaceChildren(notice('error', plainProblem(e, vesselNames())));
      return;
    }
    kept.replaceChildren(
      h('h2', {}, name ? `Kept fits of ${name}` : 'Kept fits of connected vessels'),
    );
    if (!list.items.length) {
      kept.append(h('p', { class: 'hint' }, 'None kept yet.'));
      return;
    }
    kept.append(
      h(
        'div',
        { class: 'table-wrap' },
        table(
          null,
          ['Fit', 'System', 'Site', 'Status', 'Kept', 'Reviewed', ''],
          list.items.map((f) => [
            String(f.id),
            f.systemName,
            f.site,
            h('span', { class: `badge badge-${f.status}` }, f.status),
            `${dateTime(f.createdAt)} by ${f.createdBy ?? 'the system'}`,
            f.reviewedBy ? `${dateTime(f.reviewedAt)} by ${f.reviewedBy}` : '—',
            keptActions(f, user),
          ]),
          'kept-fits',
        ),
      ),
    );
  }

  function keptActions(f: JointFitSummary, who: User): HTMLElement {
    const box = h('div', { class: 'actions kept-actions' });
    const open = h('button', { type: 'button' }, `Open fit ${f.id}`);
    open.addEventListener('click', async () => {
      try {
        const stored = await api<StoredJointFit>('GET', `/api/systems/fits/${f.id}`);
        fitted = { ...stored.result, drawing: stored.drawing };
        if (!system || system.name !== stored.systemName) {
          system = stored.result.system as Record<string, unknown>;
          drawSchematic(null);
        }
        showFit(fitted, stored);
      } catch (e) {
        status.replaceChildren(notice('error', plainProblem(e, vesselNames())));
      }
    });
    box.append(
      open,
      h(
        'a',
        { href: `/api/systems/fits/${f.id}/report.pdf`, class: 'button', download: '' },
        `Report of fit ${f.id} (PDF)`,
      ),
    );
    if (f.status === 'draft' && canReview(who)) {
      const comment = h('input', {
        type: 'text',
        name: `comment-${f.id}`,
        maxlength: 2000,
        placeholder: 'comment (optional)',
        'aria-label': `Review comment for fit ${f.id}`,
      });
      const decide = (decision: 'approve' | 'reject') => async () => {
        try {
          await api('POST', `/api/systems/fits/${f.id}/review`, {
            decision,
            ...(comment.value.trim() ? { comment: comment.value.trim() } : {}),
          });
          status.replaceChildren(
            notice('info', `Fit ${f.id} ${decision === 'approve' ? 'approved' : 'rejected'}.`),
          );
          void showKept();
        } catch (e) {
          status.replaceChildren(notice('error', plainProblem(e, vesselNames())));
        }
      };
      const approve = h('button', { type: 'button', class: 'primary' }, `Approve fit ${f.id}`);
      const reject = h('button', { type: 'button' }, `Reject fit ${f.id}`);
      approve.addEventListener('click', decide('approve'));
      reject.addEventListener('click', decide('reject'));
      box.append(comment, approve, reject);
    }
    return box;
  }

  function showFit(fit: SystemFit, stored: StoredJointFit | null = null): void {
    results.replaceChildren();
    const names = fit.correlations.parameters;
    const k = (Object.values(fit.outlets)[0]?.dischargeCoefficient?.coverageFactor ?? 2).toFixed(2);
    append(
      results,
      h('h2', {}, stored ? `Joint fit ${stored.id} (${stored.status})` : 'Joint fit (not kept)'),
      stored
        ? h(
            'p',
            { class: 'hint' },
            `Kept ${dateTime(stored.createdAt)} by ${stored.createdBy ?? 'the system'}, site ${stored.site}${stored.reviewedBy ? `; ${stored.status} ${dateTime(stored.reviewedAt)} by ${stored.reviewedBy}${stored.review?.selfReview ? ' (self-review, allowed for the site)' : ''}${stored.review?.comment ? ` — “${stored.review.comment}”` : ''}` : '; not reviewed yet'}.`,
          )
        : null,
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
      loggedInflowAverages(fit).size
        ? table(
            'Logged inflows',
            ['Into', 'Flow log', 'Readings over the span', 'Average over the test'],
            ((fit.diagnostics as { inflowLogs?: Record<string, unknown>[] }).inflowLogs ?? []).map(
              (l) => [
                String(l.to),
                String(l.file),
                String(l.samples),
                typeof l.meanM3S === 'number' ? flow(l.meanM3S) : '—',
              ],
            ),
            'inflow-logs',
          )
        : null,
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
      results.append(h('h3', {}, 'Each log, its fitted curve and its residuals'));
      const grid = h('div', { class: 'system-charts' });
      results.append(grid);
      for (const d of fit.drawing) {
        const box = h('div', {
          class: 'chart',
          id: `system-fit-${d.id}`,
          role: 'img',
          'aria-label': `Level of ${d.id} and the fitted curve`,
        });
        const resid = h('div', {
          class: 'chart',
          id: `system-residuals-${d.id}`,
          role: 'img',
          'aria-label': `Residuals of ${d.id}: reading − fitted`,
        });
        const rms = fit.residuals.find((r) => r.id === d.id)?.rmseM ?? null;
        grid.append(h('div', {}, h('h4', {}, `${d.id} · ${d.fileName}`), box, resid));
        const plot = { offsetS: 0, timeS: d.timeS, observedM: d.levelM, fittedM: d.fittedM };
        requestAnimationFrame(() => {
          fitChart(box, plot, 'time from the logs’ common start (min)');
          residualChart(resid, plot, rms);
        });
      }
    }
    const { drawing: _drop, ...keep } = fit;
    void _drop;
    results.append(
      h(
        'div',
        { class: 'actions' },
        download('system-fit.json', JSON.stringify(keep, null, 2), 'application/json'),
        stored
          ? h(
              'a',
              { href: `/api/systems/fits/${stored.id}/report.pdf`, class: 'button', download: '' },
              'Report (PDF)',
            )
          : null,
        h(
          'span',
          { class: 'hint' },
          stored
            ? `the same document as efflux fit-system --json; efflux steady, linearize and predict take this kept fit as --joint-fit ${stored.id}`
            : 'the same document as efflux fit-system --json; open it here again, or give it to efflux steady and linearize',
        ),
      ),
    );
    showOperating();
  }

  function showOperating(): void {
    operating.replaceChildren();
    if (!system) return;
    const vessels = vesselNames();
    const inputs = new Map<string, HTMLInputElement>();
    const constant = Array.isArray(system.inflows)
      ? (system.inflows as { to: string; constant?: number | string }[])
      : [];
    const averages = loggedInflowAverages(fitted);
    const sources: string[] = [];
    for (const { id } of vessels) {
      const given = constant.find((c) => c.to === id && c.constant !== undefined)?.constant;
      const average = averages.get(id);
      let value = '';
      if (given !== undefined) {
        value = typeof given === 'number' ? `${num(given * 1000, 4)} L/s` : given;
        sources.push(`${id}: the system file’s constant inflow`);
      } else if (average !== undefined) {
        value = `${num(average * 1000, 4)} L/s`;
        sources.push(`${id}: the logged inflow’s average over the test`);
      }
      inputs.set(
        id,
        h('input', { type: 'text', name: `inflow-${id}`, value, placeholder: 'none', size: 10 }),
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
          sources.length
            ? `Started from ${sources.join('; ')}. Change any of them; give each with its unit (L/s, m3/h, m3/s, gpm); empty means none.`
            : 'At what steady inflow? Give the inflow into each vessel with its unit (L/s, m3/h, m3/s, gpm); empty means none.',
        ),
        h(
          'div',
          { class: 'grid' },
          vessels.map(({ id, name }) => field(`Inflow into ${name} (${id})`, inputs.get(id)!)),
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
      if (!inflows.length) {
        out.append(
          notice(
            'error',
            'Give the inflow into at least one vessel to work out an operating point.',
          ),
        );
        return;
      }
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
        // inflows.N.flow → the inflow field of that vessel, as the page names it
        const p = e instanceof ApiError ? e.problem : null;
        const m = /^inflows\.(\d+)/.exec(String(p?.field ?? ''));
        const v = m ? vessels.find((x) => x.id === inflows[Number(m[1])]?.to) : undefined;
        out.append(
          notice(
            'error',
            v
              ? `Inflow into ${v.name} (${v.id}): ${String((p?.errors as { message: string }[] | undefined)?.[0]?.message ?? p?.detail)}`
              : plainProblem(e, vessels),
          ),
        );
      } finally {
        go.disabled = false;
      }
    });
  }

  void showKept();
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
  const copy = h('button', { type: 'button' }, 'Copy the text');
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
    h('h3', {}, 'The linear model as text (for a design note)'),
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
