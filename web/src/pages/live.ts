/**
 * Live drain tests. `#/vessels/ID/live` opens one (file name, target); `#/live/UUID` follows it:
 * readings drawn as they arrive (server-sent events from GET /api/live/:id/events), the opening
 * found by each refit, Cd ± U and the narrowing u_r against the target, and a plain notice when
 * there is enough data and the valve may be closed. Closing stores the bytes as an ordinary
 * upload and links to its fit.
 */
import { api, ApiError, canUpload, type Vessel } from '../api.js';
import { clear, field, h, notice, select } from '../dom.js';
import type { PageContext } from '../main.js';
import { liveChart, narrowingChart } from '../plan-charts.js';
import { safetyCaution } from './new-test.js';

interface Quantity {
  value: number;
  standardUncertainty: number;
  expandedUncertainty: number;
  relativeStandardUncertainty: number;
}
interface LiveFit {
  elapsedS: number;
  rows: number;
  status: 'fitted' | 'waiting';
  message: string;
  openingS: number | null;
  cd: Quantity | null;
  effectiveArea: Quantity | null;
  targetRelative: number | null;
  enough: boolean;
  fittedCurve: { timeS: number[]; levelM: number[] } | null;
}
interface LiveState {
  id: string;
  vesselId: number;
  fileName: string;
  receivedBytes: number;
  rows: number;
  status: string;
  target: { quantity: string; relativeStandardUncertainty: number };
  latest: LiveFit | null;
  history: {
    elapsedS: number;
    value: number | null;
    expandedUncertainty: number | null;
    relative: number | null;
  }[];
  testId: number | null;
  fitId: number | null;
}

const pct = (x: number) => `${Number((x * 100).toPrecision(3))} %`;

export async function liveOpenPage({ user, params, main, go }: PageContext): Promise<void> {
  const id = Number(params[0]);
  const v = await api<Vessel>('GET', `/api/vessels/${id}`);
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${id}` }, v.name),
      ' › live test',
    ),
    h('h1', {}, `Live drain test: ${v.name}`),
    safetyCaution(),
    h(
      'p',
      {},
      'Open the live test before the valve opens, then send the logger’s rows as they are written: ',
      h('code', {}, 'efflux watch <file> --live <id> --to <this service>'),
      ', or a gateway posting rows to the API.',
    ),
  );
  if (!canUpload(user)) {
    main.append(notice('info', 'Your role can follow live tests but not open them.'));
    return;
  }
  const outlets = v.outlets.filter((o) => o.retiredAt === null);
  const outlet =
    outlets.length > 1
      ? select(
          'outletId',
          outlets.map((o) => [String(o.id), o.key]),
        )
      : null;
  const fileName = h('input', {
    name: 'fileName',
    required: true,
    value: `${v.name.replace(/[^\w.-]+/g, '-').toLowerCase()}-live.csv`,
  });
  const target = h('input', {
    name: 'targetPercent',
    type: 'number',
    step: 'any',
    value: '1',
    required: true,
  });
  const quantity = select(
    'quantity',
    [
      ['discharge-coefficient', 'u_r(Cd)'],
      ['effective-area', 'u_r(Cd·a)'],
    ],
    'discharge-coefficient',
  );
  const button = h('button', { type: 'submit', class: 'primary' }, 'Open live test');
  const form = h(
    'form',
    { class: 'card' },
    h(
      'div',
      { class: 'grid' },
      outlet ? field('Outlet', outlet) : null,
      field('File name to store', fileName),
      field('Target (%)', target, 'enough data when the fit reaches it'),
      field('Target is', quantity),
    ),
    button,
  );
  const out = h('div', { 'aria-live': 'polite' });
  main.append(form, out);
  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    clear(out);
    button.disabled = true;
    try {
      const s = await api<LiveState>('POST', `/api/vessels/${id}/live`, {
        fileName: fileName.value.trim(),
        outletId: outlet ? Number(outlet.value) : undefined,
        target: {
          quantity: quantity.value,
          relativeStandardUncertainty: Number(target.value) / 100,
        },
      });
      go(`#/live/${s.id}`);
    } catch (err) {
      out.append(notice('error', err instanceof Error ? err.message : String(err)));
      button.disabled = false;
    }
  });
}

export async function livePage({ user, params, main }: PageContext): Promise<void> {
  const id = params[0];
  const first = await api<LiveState>('GET', `/api/live/${id}`);
  const v = await api<Vessel>('GET', `/api/vessels/${first.vesselId}`);
  const label = first.target.quantity === 'effective-area' ? 'u_r(Cd·a)' : 'u_r(Cd)';
  const received = h('span', { class: 'live-rows' }, '0 rows');
  const headline = h('p', { class: 'live-headline' }, 'Waiting for the first fit…');
  const message = h('p', { class: 'live-message' });
  const enough = h('div', { class: 'live-enough', role: 'status', 'aria-live': 'assertive' });
  const readingsEl = h('div', {
    class: 'chart live-chart',
    role: 'img',
    'aria-label': 'Readings as they arrive, with the fitted curve',
  });
  const what = first.target.quantity === 'effective-area' ? 'Cd·a (m²)' : 'Cd';
  const narrowingEl = h('div', {
    class: 'chart live-narrowing',
    role: 'img',
    'aria-label': `${what} ± U after each refit, with the target`,
  });
  const done = h('div', { 'aria-live': 'polite' });
  const closeButton = canUpload(user)
    ? h('button', { type: 'button', class: 'primary' }, 'Close and store the test')
    : null;
  const abandonButton = canUpload(user)
    ? h('button', { type: 'button', class: 'quiet' }, 'Abandon')
    : null;
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${v.id}` }, v.name),
      ' › live test',
    ),
    h('h1', {}, `Live drain test: ${v.name}`),
    h(
      'p',
      {},
      `Live test ${id} · file ${first.fileName} · target ${label} ≤ ${pct(first.target.relativeStandardUncertainty)} · `,
      received,
    ),
    h(
      'p',
      { class: 'muted' },
      'Send rows with ',
      h('code', {}, `efflux watch <file> --live ${id} --to ${location.origin}`),
      '.',
    ),
    enough,
    headline,
    message,
    readingsEl,
    h('h2', {}, `${what} ± U as the data come in, and the target`),
    narrowingEl,
    h('div', { class: 'actions' }, closeButton, ' ', abandonButton),
    done,
  );
  const chart = liveChart(readingsEl);
  const narrowing = narrowingChart(narrowingEl, what, 4);
  const targetRelative = first.target.relativeStandardUncertainty;
  const readings = { timeS: [] as number[], levelM: [] as number[] };
  let latest: LiveFit | null = first.latest;
  const history = first.history.map((p) => ({
    elapsedS: p.elapsedS,
    value: p.value,
    expandedUncertainty: p.expandedUncertainty,
  }));
  const quantityOf = (f: LiveFit | null) =>
    f ? (first.target.quantity === 'effective-area' ? f.effectiveArea : f.cd) : null;
  const targetLines = () => {
    const q = quantityOf(latest);
    return q
      ? { relative: targetRelative, coverageFactor: q.expandedUncertainty / q.standardUncertainty }
      : null;
  };

  const redraw = () =>
    chart.update(readings, latest?.fittedCurve ?? null, latest?.openingS ?? null);
  const showFit = (f: LiveFit | null) => {
    latest = f;
    if (!f) return;
    const cd = f.cd;
    headline.textContent = cd
      ? `Cd = ${cd.value.toFixed(4)} ± ${cd.expandedUncertainty.toFixed(4)} (U, 95 %), ${label} ${f.targetRelative === null ? '—' : pct(f.targetRelative)} after ${f.rows} rows`
      : `No fit yet after ${f.rows} rows`;
    message.textContent = f.message;
    clear(enough);
    if (f.enough)
      enough.append(
        notice(
          'info',
          h('strong', {}, 'Enough data: the valve may be closed. '),
          'Close it following the site’s procedure, then close the test here to store it.',
        ),
      );
    redraw();
  };
  showFit(latest);
  narrowing.update(history, targetLines());

  const events = new EventSource(`/api/live/${id}/events`);
  const stop = () => events.close();
  window.addEventListener('hashchange', stop, { once: true });
  events.addEventListener('rows', (e) => {
    if (!main.isConnected) return stop();
    const d = JSON.parse((e as MessageEvent).data) as {
      rows: number;
      readings: { fromIndex: number; timeS: number[]; levelM: number[] } | null;
    };
    received.textContent = `${d.rows} rows received`;
    if (d.readings) {
      readings.timeS.length = readings.levelM.length = Math.min(
        d.readings.fromIndex,
        readings.timeS.length,
      );
      readings.timeS.push(...d.readings.timeS);
      readings.levelM.push(...d.readings.levelM);
      redraw();
    }
  });
  events.addEventListener('fit', (e) => {
    const { fit } = JSON.parse((e as MessageEvent).data) as { fit: LiveFit };
    const q = quantityOf(fit);
    history.push({
      elapsedS: fit.elapsedS,
      value: q?.value ?? null,
      expandedUncertainty: q?.expandedUncertainty ?? null,
    });
    showFit(fit);
    narrowing.update(history, targetLines());
  });
  events.addEventListener('closed', (e) => {
    const d = JSON.parse((e as MessageEvent).data) as { testId: number; fitId: number };
    stop();
    clear(done);
    done.append(
      notice(
        'info',
        `Stored as test ${d.testId}. `,
        h('a', { href: `#/fits/${d.fitId}`, class: 'stored-fit' }, 'Open its fit for review'),
      ),
    );
    if (closeButton) closeButton.disabled = true;
    if (abandonButton) abandonButton.disabled = true;
  });
  events.addEventListener('abandoned', () => {
    stop();
    clear(done);
    done.append(notice('info', 'This live test was abandoned; nothing was stored.'));
  });

  const closeTest = async (allowDuplicate: boolean) => {
    const r = await api<{ test: { id: number }; fit: { id: number } }>(
      'POST',
      `/api/live/${id}/close${allowDuplicate ? '?allowDuplicate=true' : ''}`,
    );
    clear(done);
    done.append(
      notice(
        'info',
        `Stored as test ${r.test.id}. `,
        h('a', { href: `#/fits/${r.fit.id}`, class: 'stored-fit' }, 'Open its fit for review'),
      ),
    );
    stop();
  };
  closeButton?.addEventListener('click', async () => {
    closeButton.disabled = true;
    try {
      await closeTest(false);
    } catch (err) {
      clear(done);
      // the same bytes as an earlier test of this vessel: say which, and let the person store it anyway
      if (
        err instanceof ApiError &&
        err.status === 409 &&
        typeof err.problem?.existingTestId === 'number'
      ) {
        const again = h('button', { type: 'button' }, 'Store it again anyway');
        again.addEventListener('click', async () => {
          again.disabled = true;
          try {
            await closeTest(true);
          } catch (e2) {
            clear(done);
            done.append(notice('error', e2 instanceof Error ? e2.message : String(e2)));
            closeButton.disabled = false;
          }
        });
        done.append(
          notice(
            'caution',
            `This file is already stored: test ${err.problem.existingTestId}. `,
            again,
          ),
        );
        return;
      }
      done.append(notice('error', err instanceof Error ? err.message : String(err)));
      closeButton.disabled = false;
    }
  });
  abandonButton?.addEventListener('click', async () => {
    if (!confirm('Abandon this live test? Nothing received is stored.')) return;
    await api('DELETE', `/api/live/${id}`).catch(() => undefined);
  });
}
