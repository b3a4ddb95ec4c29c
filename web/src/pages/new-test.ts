/**
 * A new drain test: choose or drop the logger file (and a barometric log), see what the reader
 * made of it, check the drain window on the whole log (drag across the chart or type the times),
 * choose the model, and fit. The file is stored only when it is fitted.
 */
import {
  api,
  ApiError,
  apiUpload,
  canUpload,
  type DrainTest,
  type Fit,
  type Inspection,
  type Settings,
  type Vessel,
} from '../api.js';
import { logChart, type LogChart } from '../charts.js';
import { clear, field, h, notice, select, table } from '../dom.js';
import { clockAt, metres, seconds } from '../format.js';
import type { PageContext } from '../main.js';
import { modelForm, readingForm, windowForm } from '../reading.js';

export function safetyCaution(): HTMLElement {
  return notice(
    'caution',
    h('strong', {}, 'Safety. '),
    'A drain test can mean work at height, entry to confined spaces, hot or hazardous liquids and discharges to drains or the environment. Follow your site’s procedures and permits, local codes and licensed engineering practice. Results here are engineering estimates with a stated uncertainty, not a certification of any vessel or outlet.',
  );
}

/** The first lines of a file in the browser, only when the service offers no preview. */
async function localHead(file: File): Promise<string[]> {
  const bytes = new Uint8Array(await file.slice(0, 16384).arrayBuffer());
  const enc =
    bytes[0] === 0xff && bytes[1] === 0xfe
      ? 'utf-16le'
      : bytes[0] === 0xfe && bytes[1] === 0xff
        ? 'utf-16be'
        : 'utf-8';
  return new TextDecoder(enc).decode(bytes).replace(/\r\n?/g, '\n').split('\n').slice(0, 25);
}

function headTable(lines: string[], headerLine: number | null): HTMLElement {
  return h(
    'div',
    { class: 'table-wrap head-lines' },
    h(
      'table',
      { class: 'raw' },
      h('caption', {}, 'The first lines of the file, as written'),
      h(
        'thead',
        {},
        h('tr', {}, h('th', { scope: 'col' }, 'line'), h('th', { scope: 'col' }, 'text')),
      ),
      h(
        'tbody',
        {},
        lines.map((l, i) =>
          h(
            'tr',
            { class: headerLine === i + 1 ? 'header-line' : '' },
            h('td', { class: 'num' }, String(i + 1)),
            h('td', {}, h('code', {}, l)),
          ),
        ),
      ),
    ),
  );
}

export async function newTestPage({ user, params, main, go }: PageContext): Promise<void> {
  const id = Number(params[0]);
  const v = await api<Vessel>('GET', `/api/vessels/${id}`);
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${id}` }, v.name),
      ' › new drain test',
    ),
    h('h1', {}, `New drain test: ${v.name}`),
    safetyCaution(),
  );
  if (!canUpload(user)) {
    main.append(notice('info', 'Your role can read tests but not add them.'));
    return;
  }
  const outlets = v.outlets.filter((o) => o.retiredAt === null);
  const sensor = (v.spec.sensor ?? {}) as Record<string, unknown>;
  const datumKnown =
    typeof sensor.zeroElevationM === 'number' || typeof sensor.mountElevationM === 'number';

  // 1. the files
  const logInput = h('input', {
    type: 'file',
    name: 'log',
    accept: '.csv,.txt,.tsv,.dat,.xlsx,text/*',
    required: true,
  });
  const baroInput = h('input', {
    type: 'file',
    name: 'baro',
    accept: '.csv,.txt,.tsv,.dat,text/*',
  });
  const dropZone = h(
    'div',
    { class: 'drop-zone' },
    h('p', {}, 'Drop the logger file here, or choose it:'),
    field('Logger file', logInput),
    field('Barometric log (optional, for an absolute-pressure sensor)', baroInput),
  );
  dropZone.addEventListener('dragover', (e) => {
    e.preventDefault();
    dropZone.classList.add('over');
  });
  dropZone.addEventListener('dragleave', () => dropZone.classList.remove('over'));
  dropZone.addEventListener('drop', (e) => {
    e.preventDefault();
    dropZone.classList.remove('over');
    const files = e.dataTransfer?.files;
    if (!files?.length) return;
    const dt = new DataTransfer();
    dt.items.add(files[0]);
    logInput.files = dt.files;
    if (files.length > 1) {
      const b = new DataTransfer();
      b.items.add(files[1]);
      baroInput.files = b.files;
    }
    void inspect();
  });

  const outletSel =
    outlets.length > 1
      ? select(
          'outletId',
          outlets.map((o): [string, string] => [String(o.id), o.key]),
          String(outlets[0].id),
        )
      : null;
  const testedAt = h('input', { type: 'datetime-local', name: 'testedAt' });
  const operator = h('input', { type: 'text', name: 'operator', autocomplete: 'name' });
  const loggerId = h('input', { type: 'text', name: 'loggerId' });
  const notes = h('textarea', { name: 'notes', rows: 2 });
  const details = h(
    'fieldset',
    { class: 'details' },
    h('legend', {}, 'About the test'),
    h(
      'div',
      { class: 'grid' },
      outletSel ? field('Outlet tested', outletSel) : null,
      field(
        'Tested on (local time; blank: the first reading of the fitted window on the log’s own clock — a log with elapsed time only needs it)',
        testedAt,
      ),
      field('Operator', operator),
      field('Logger', loggerId),
      field('Notes', notes),
    ),
  );

  const reading = readingForm();
  const reread = h('button', { type: 'button' }, 'Read the file again with these settings');
  reread.addEventListener('click', () => void inspect());
  reading.el.appendChild(reread);

  const preview = h('section', { class: 'preview', 'aria-live': 'polite' });
  const chartBox = h('div', { class: 'chart', id: 'log-chart' });
  let chart: LogChart | null = null;
  let t0: string | null = null;
  const win = windowForm((s) => clockAt(t0, s));
  win.onChange((a, b) => chart?.setWindow(a, b));
  const dragHint = h(
    'p',
    { class: 'hint' },
    'The shaded stretch is the part of the log that is fitted. Drag across the chart to choose another, or type the times.',
  );
  const typeHint = h(
    'p',
    { class: 'hint' },
    'Leave both empty to let the service choose the window, or type the stretch to fit.',
  );
  const windowSection = h(
    'section',
    { class: 'window' },
    h('h2', {}, 'Drain window'),
    dragHint,
    typeHint,
    chartBox,
    win.el,
  );
  windowSection.hidden = true;

  const model = modelForm({}, !datumKnown);
  const status = h('div', { 'aria-live': 'polite' });
  const submit = h('button', { type: 'submit', class: 'primary' }, 'Fit this test');
  const form = h(
    'form',
    { class: 'new-test' },
    h('section', {}, h('h2', {}, 'Logger file'), dropZone),
    details,
    reading.el,
    preview,
    windowSection,
    model.el,
    h('div', { class: 'actions' }, submit, status),
  );
  main.append(form);

  const formData = (withWindow: boolean): FormData => {
    const fd = new FormData();
    fd.append('log', logInput.files![0]);
    if (baroInput.files?.length) fd.append('baro', baroInput.files[0]);
    if (outletSel) fd.append('outletId', outletSel.value);
    const s: Settings = { ...reading.values() };
    for (const [k, val] of Object.entries(s)) fd.append(k, String(val));
    if (withWindow) {
      const w = win.value();
      if (w) fd.append('window', w);
      for (const [k, val] of Object.entries(model.values())) fd.append(k, String(val));
      if (testedAt.value) fd.append('testedAt', new Date(testedAt.value).toISOString());
      if (operator.value.trim()) fd.append('operator', operator.value.trim());
      if (loggerId.value.trim()) fd.append('loggerId', loggerId.value.trim());
      if (notes.value.trim()) fd.append('notes', notes.value.trim());
    }
    return fd;
  };

  let inspecting = 0;
  async function inspect(): Promise<void> {
    if (!logInput.files?.length) return;
    const mine = ++inspecting;
    clear(preview);
    preview.append(h('p', {}, 'Reading the file…'));
    let r: Inspection;
    try {
      r = await api<Inspection>('POST', `/api/vessels/${id}/inspect`, formData(false));
    } catch (e) {
      if (mine !== inspecting) return;
      clear(preview);
      if (
        e instanceof ApiError &&
        e.status === 404 &&
        e.problem?.detail &&
        String(e.problem.detail).startsWith('no route')
      ) {
        // this service has no preview route: show the text, let the fit detect the rest
        preview.append(
          h('h2', {}, 'Preview'),
          notice(
            'info',
            'This service does not offer a preview of the reading. The columns and the drain window are detected when the test is fitted; you can change the window on the fit page, or type it below.',
          ),
          headTable(await localHead(logInput.files[0]), null),
        );
        windowSection.hidden = false;
        chartBox.hidden = true;
        dragHint.hidden = true;
        typeHint.hidden = false;
        win.detected(false);
        return;
      }
      preview.append(
        notice(
          'error',
          `The file could not be read: ${e instanceof Error ? e.message : String(e)}`,
        ),
      );
      windowSection.hidden = true;
      return;
    }
    if (mine !== inspecting) return;
    showInspection(r);
  }

  function showInspection(r: Inspection): void {
    clear(preview);
    const d = r.detected as Record<string, any>;
    t0 = r.series.t0;
    const cols = (d.columns ?? []) as {
      index: number;
      header: string;
      role: string;
      unit: string | null;
      reason: string;
    }[];
    reading.setColumns(cols.map((c) => c.header));
    const headerLine = (d.notes as { code: string; message: string }[] | undefined)
      ?.find((n) => n.code === 'header')
      ?.message.match(/line (\d+)/)?.[1];
    const notes = [...(d.notes ?? []), ...(d.windowNotes ?? [])] as {
      code: string;
      message: string;
    }[];
    const warnings = [...(d.warnings ?? []), ...(d.windowWarnings ?? [])] as {
      code: string;
      message: string;
    }[];
    preview.append(
      h('h2', {}, 'What was read'),
      h(
        'div',
        { class: 'preview-grid' },
        headTable(r.head.lines, headerLine ? Number(headerLine) : null),
        h(
          'div',
          {},
          table(
            'Columns found',
            ['Column', 'Taken as', 'Unit', 'Why'],
            cols.map((c) => [c.header, c.role.replace(/-/g, ' '), c.unit ?? '—', c.reason]),
          ),
          table(
            'The log',
            ['', ''],
            [
              ['Text encoding', r.head.encoding],
              ['Readings', String(d.samples)],
              [
                'First reading',
                d.start
                  ? String(d.start).replace('T', ' ').replace('.000Z', ' UTC')
                  : 'elapsed time only',
              ],
              ['Length', seconds(d.durationS)],
              ['Usual interval', seconds(d.medianIntervalS)],
              ['Level range', `${metres(d.level?.minM)} to ${metres(d.level?.maxM)}`],
              ['Gaps', String((d.gaps ?? []).length)],
            ],
            'kv',
          ),
        ),
      ),
      warnings.length
        ? h(
            'div',
            {},
            h('h3', {}, 'Warnings'),
            h(
              'ul',
              { class: 'warnings' },
              warnings.map((w) => h('li', {}, w.message)),
            ),
          )
        : '',
      h(
        'details',
        {},
        h('summary', {}, `How the file was read (${notes.length} notes)`),
        h(
          'ul',
          {},
          notes.map((n) => h('li', {}, n.message)),
        ),
      ),
    );
    windowSection.hidden = false;
    chartBox.hidden = false;
    dragHint.hidden = false;
    typeHint.hidden = true;
    win.detected(true);
    chart?.destroy();
    clear(chartBox);
    const w = d.window as { startS: number; endS: number };
    chart = logChart(chartBox, r.series.timeS, r.series.levelM, w, (a, b) => {
      win.set(a, b, true);
      chart?.setWindow(a, b);
    });
    win.set(w.startS, w.endS, false);
  }

  logInput.addEventListener('change', () => void inspect());
  baroInput.addEventListener('change', () => void inspect());

  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    status.replaceChildren();
    if (!logInput.files?.length) {
      status.append(notice('error', 'Choose the logger file first.'));
      logInput.focus();
      return;
    }
    submit.disabled = true;
    status.append(h('p', {}, 'Storing the file and fitting… a long log can take a little while.'));
    // one key per attempt: a retry after a lost answer gets the first result, not a second test
    const key = crypto.randomUUID();
    const send = async (fd: FormData) => {
      const r = await apiUpload<{ test: DrainTest; fit: Fit }>(`/api/vessels/${id}/tests`, fd, key);
      go(`#/fits/${r.fit.id}`);
    };
    try {
      await send(formData(true));
    } catch (err) {
      if (
        err instanceof ApiError &&
        err.status === 409 &&
        typeof err.problem?.existingTestId === 'number'
      ) {
        const again = h('button', { type: 'button' }, 'Store it again anyway');
        again.addEventListener('click', async () => {
          const fd = formData(true);
          fd.append('allowDuplicate', 'true');
          again.disabled = true;
          try {
            await send(fd);
          } catch (e2) {
            status.replaceChildren(
              notice('error', `Not fitted: ${e2 instanceof Error ? e2.message : String(e2)}`),
            );
          }
        });
        status.replaceChildren(
          notice(
            'caution',
            `This file is already stored: `,
            h('a', { href: `#/vessels/${id}` }, `test ${err.problem.existingTestId}`),
            '. ',
            again,
          ),
        );
      } else {
        status.replaceChildren(
          notice('error', `Not fitted: ${err instanceof Error ? err.message : String(err)}`),
        );
      }
      submit.disabled = false;
    }
  });
}
