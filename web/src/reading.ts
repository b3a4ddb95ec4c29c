/** The reading settings form, shared by the new-test page and the refit form: each one "as detected" unless a person says otherwise. */
import type { Settings } from './api.js';
import { field, h, select } from './dom.js';

export interface ReadingForm {
  el: HTMLElement;
  values(): Settings;
  setColumns(headers: string[]): void;
}

const UNITS = ['m', 'cm', 'mm', 'ft', 'in', 'kPa', 'Pa', 'bar', 'mbar', 'psi', 'mH2O', 'inH2O'];

export function readingForm(initial: Settings = {}): ReadingForm {
  const timeColumn = select('timeColumn', [['', 'as detected']], initial.timeColumn ?? '');
  const levelColumn = select('levelColumn', [['', 'as detected']], initial.levelColumn ?? '');
  const unit = h('input', {
    type: 'text',
    name: 'unit',
    list: 'unit-list',
    value: initial.unit ?? '',
    placeholder: 'as detected',
    autocomplete: 'off',
    size: 8,
  });
  const units = h(
    'datalist',
    { id: 'unit-list' },
    UNITS.map((u) => h('option', { value: u })),
  );
  const quantity = select(
    'quantity',
    [
      ['', 'as detected'],
      ['level', 'level'],
      ['gauge-pressure', 'gauge pressure (vented sensor)'],
      ['absolute-pressure', 'absolute pressure (needs a barometric log)'],
      ['distance-from-top', 'distance from the top (radar, ultrasonic)'],
    ],
    initial.quantity ?? '',
  );
  const dateOrder = select(
    'dateOrder',
    [
      ['', 'as detected'],
      ['dmy', 'day / month / year'],
      ['mdy', 'month / day / year'],
      ['ymd', 'year / month / day'],
    ],
    initial.dateOrder ?? '',
  );
  const tz = h('input', {
    type: 'text',
    name: 'tz',
    value: initial.tz ?? '',
    placeholder: 'UTC unless stated, e.g. Europe/Lisbon',
    autocomplete: 'off',
  });
  const delimiter = select(
    'delimiter',
    [
      ['', 'as detected'],
      [',', 'comma ,'],
      [';', 'semicolon ;'],
      ['tab', 'tab'],
      ['|', 'pipe |'],
    ],
    initial.delimiter ?? '',
  );
  const decimal = select(
    'decimal',
    [
      ['', 'as detected'],
      ['.', 'point 1.5'],
      [',', 'comma 1,5'],
    ],
    initial.decimal ?? '',
  );
  const text = (name: string, value: string | undefined, placeholder: string) =>
    h('input', { type: 'text', name, value: value ?? '', placeholder, autocomplete: 'off' });
  const levelTag = text('levelTag', initial.levelTag, 'files with one row per time, tag and value');
  const baroTag = text('baroTag', initial.baroTag, 'barometric tag in the same file, if any');
  const sheet = text('sheet', initial.sheet, 'workbooks: the first sheet unless named');

  const setColumns = (headers: string[]) => {
    for (const s of [timeColumn, levelColumn]) {
      const keep = s.value;
      s.replaceChildren(
        h('option', { value: '' }, 'as detected'),
        ...headers.map((x) => h('option', { value: x }, x)),
      );
      if (keep && !headers.includes(keep)) s.appendChild(h('option', { value: keep }, keep));
      s.value = keep;
    }
  };
  if (initial.timeColumn || initial.levelColumn) setColumns([]);

  const el = h(
    'fieldset',
    { class: 'reading' },
    h('legend', {}, 'How to read the file'),
    h(
      'p',
      { class: 'hint' },
      'Leave a setting "as detected" unless the preview shows it was read wrongly.',
    ),
    h(
      'div',
      { class: 'grid' },
      field('Time column', timeColumn),
      field('Level column', levelColumn),
      field('Unit of the level column', unit, 'length or pressure unit'),
      units,
      field('What the column measures', quantity),
      field('Date order', dateOrder),
      field('Time zone of local times', tz),
      field('Delimiter', delimiter),
      field('Decimal mark', decimal),
      field('Level tag', levelTag),
      field('Barometric tag', baroTag),
      field('Workbook sheet', sheet),
    ),
  );
  return {
    el,
    setColumns,
    values() {
      const s: Settings = {};
      if (timeColumn.value) s.timeColumn = timeColumn.value;
      if (levelColumn.value) s.levelColumn = levelColumn.value;
      if (unit.value.trim()) s.unit = unit.value.trim();
      if (quantity.value) s.quantity = quantity.value;
      if (dateOrder.value) s.dateOrder = dateOrder.value;
      if (tz.value.trim()) s.tz = tz.value.trim();
      if (delimiter.value) s.delimiter = delimiter.value;
      if (decimal.value) s.decimal = decimal.value;
      if (levelTag.value.trim()) s.levelTag = levelTag.value.trim();
      if (baroTag.value.trim()) s.baroTag = baroTag.value.trim();
      if (sheet.value.trim()) s.sheet = sheet.value.trim();
      return s;
    },
  };
}

export interface ModelForm {
  el: HTMLElement;
  values(): Pick<Settings, 'fitInflow' | 'fitDatum' | 'fitExponent'>;
}

export function modelForm(initial: Settings = {}, datumRequired = false): ModelForm {
  const box = (name: string, label: string, hint: string, checked: boolean, locked = false) => {
    const input = h('input', { type: 'checkbox', name, checked, disabled: locked });
    input.id = `opt-${name}`;
    return {
      input,
      el: h(
        'div',
        { class: 'check' },
        input,
        h('label', { for: input.id }, label),
        h('span', { class: 'hint' }, hint),
      ),
    };
  };
  const inflow = box(
    'fitInflow',
    'Fit a steady inflow',
    'a passing inlet valve or a second leak',
    !!initial.fitInflow,
  );
  const datum = box(
    'fitDatum',
    'Fit the sensor zero',
    datumRequired
      ? 'required: the vessel file gives no sensor zero'
      : 'when the sensor height is not known well',
    datumRequired || !!initial.fitDatum,
    datumRequired,
  );
  const exponent = box(
    'fitExponent',
    'Fit the head exponent n',
    '0.5 for an orifice; free it to test the outflow law',
    !!initial.fitExponent,
  );
  return {
    el: h(
      'fieldset',
      { class: 'model' },
      h('legend', {}, 'Model'),
      inflow.el,
      datum.el,
      exponent.el,
    ),
    values: () => ({
      fitInflow: inflow.input.checked,
      fitDatum: datum.input.checked,
      fitExponent: exponent.input.checked,
    }),
  };
}

/** Window fields in seconds from the log's first reading, with the clock time beside them. */
export interface WindowForm {
  el: HTMLElement;
  set(startS: number, endS: number, byPerson: boolean): void;
  /** "START..END" when a person chose it, else undefined (the service chooses). */
  value(): string | undefined;
  onChange(cb: (startS: number, endS: number) => void): void;
  /** Whether there is a detected window to go back to. */
  detected(yes: boolean): void;
}

export function windowForm(
  clock: (s: number) => string | null,
  autoLabel = 'Detected window',
): WindowForm {
  const start = h('input', {
    type: 'number',
    name: 'windowStart',
    step: 'any',
    min: 0,
    inputmode: 'decimal',
  });
  const end = h('input', {
    type: 'number',
    name: 'windowEnd',
    step: 'any',
    min: 0,
    inputmode: 'decimal',
  });
  const said = h('p', { class: 'hint', 'aria-live': 'polite' });
  let byPerson = false;
  let auto: [number, number] | null = null;
  const listeners: ((a: number, b: number) => void)[] = [];
  const reset = h(
    'button',
    { type: 'button', class: 'quiet' },
    autoLabel === 'Detected window' ? 'Use the detected window' : 'Back to this fit’s window',
  );
  const describe = () => {
    const a = Number(start.value),
      b = Number(end.value);
    if (start.value === '' || end.value === '' || !(b > a)) {
      said.textContent =
        start.value === '' && end.value === ''
          ? 'No window stated: the service chooses it.'
          : 'Give a start and a later end.';
      return;
    }
    const ca = clock(a),
      cb = clock(b);
    said.textContent = `${byPerson ? 'Your window' : autoLabel}: ${a.toFixed(1)} s to ${b.toFixed(1)} s from the first reading (${(b - a).toFixed(1)} s long)${ca && cb ? `, ${ca} to ${cb}` : ''}.`;
  };
  const changed = () => {
    byPerson = true;
    describe();
    const a = Number(start.value),
      b = Number(end.value);
    if (Number.isFinite(a) && Number.isFinite(b) && b > a) listeners.forEach((f) => f(a, b));
  };
  start.addEventListener('change', changed);
  end.addEventListener('change', changed);
  reset.addEventListener('click', () => {
    if (!auto) return;
    api.set(auto[0], auto[1], false);
    listeners.forEach((f) => f(auto![0], auto![1]));
  });
  const api: WindowForm = {
    el: h(
      'div',
      { class: 'window-fields' },
      h(
        'div',
        { class: 'field' },
        h('label', { for: 'win-start' }, 'Window start (s from the first reading)'),
        start,
      ),
      h(
        'div',
        { class: 'field' },
        h('label', { for: 'win-end' }, 'Window end (s from the first reading)'),
        end,
      ),
      reset,
      said,
    ),
    set(a, b, person) {
      if (!person) auto = [a, b];
      byPerson = person;
      start.value = a.toFixed(1);
      end.value = b.toFixed(1);
      describe();
    },
    value: () =>
      byPerson && Number(end.value) > Number(start.value)
        ? `${Number(start.value)}..${Number(end.value)}`
        : undefined,
    onChange: (cb) => listeners.push(cb),
    detected(yes) {
      reset.hidden = !yes;
    },
  };
  start.id = 'win-start';
  end.id = 'win-end';
  return api;
}
