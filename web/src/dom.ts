/**
 * Building the page: every text goes in through textContent or an attribute, never as HTML, so
 * nothing a person typed (vessel names, comments, file contents) can become markup.
 */
type Child = Node | string | number | null | undefined | false;
type Attrs = Record<string, string | number | boolean | null | undefined | ((e: Event) => void)>;

export function h<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  attrs: Attrs = {},
  ...children: (Child | Child[])[]
): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === null || v === undefined || v === false) continue;
    if (typeof v === 'function') el.addEventListener(k.replace(/^on/, ''), v as EventListener);
    else if (k === 'class') el.className = String(v);
    else if (v === true) el.setAttribute(k, '');
    else el.setAttribute(k, String(v));
  }
  append(el, children);
  return el;
}

export function append(el: Node, children: (Child | Child[])[]): void {
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.appendChild(
      typeof c === 'string' || typeof c === 'number' ? document.createTextNode(String(c)) : c,
    );
  }
}

const SVG_NS = 'http://www.w3.org/2000/svg';
export function svg(
  tag: string,
  attrs: Record<string, string | number> = {},
  ...children: (SVGElement | string)[]
): SVGElement {
  const el = document.createElementNS(SVG_NS, tag);
  for (const [k, v] of Object.entries(attrs)) el.setAttribute(k, String(v));
  for (const c of children) el.appendChild(typeof c === 'string' ? document.createTextNode(c) : c);
  return el;
}

export function clear(el: Element): void {
  while (el.firstChild) el.removeChild(el.firstChild);
}

/** A cell that is a date (2026-03-09, or with a time) as <time>, which never wraps mid-date. */
const ISO_DATE = /^\d{4}-\d{2}-\d{2}([ T]\d{2}:\d{2}(:\d{2}(\.\d+)?)?( ?UTC|Z)?)?$/;
const dateCell = (c: Child): Child =>
  typeof c === 'string' && ISO_DATE.test(c) ? h('time', {}, c) : c;

/** A table from a header row and rows of cells. */
export function table(
  caption: string | null,
  head: string[],
  rows: Child[][],
  cls = '',
): HTMLTableElement {
  return h(
    'table',
    { class: cls },
    caption ? h('caption', {}, caption) : null,
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        head.map((t) => h('th', { scope: 'col' }, t)),
      ),
    ),
    h(
      'tbody',
      {},
      rows.map((r) =>
        h(
          'tr',
          {},
          r.map((c) => h('td', {}, dateCell(c))),
        ),
      ),
    ),
  );
}

/** A labelled form control: the label is tied to the control by id (screen readers, clicks). */
let seq = 0;
export function field(
  label: string,
  control: HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement,
  hint?: string,
): HTMLElement {
  if (!control.id) control.id = `f${++seq}`;
  const hintEl = hint ? h('span', { class: 'hint', id: `${control.id}-hint` }, hint) : null;
  if (hintEl) control.setAttribute('aria-describedby', hintEl.id);
  return h('div', { class: 'field' }, h('label', { for: control.id }, label), control, hintEl);
}

export function select(name: string, options: [string, string][], value = ''): HTMLSelectElement {
  const s = h('select', { name });
  for (const [v, text] of options)
    s.appendChild(h('option', { value: v, selected: v === value }, text));
  s.value = value;
  return s;
}

export function notice(kind: 'error' | 'info' | 'caution', ...children: Child[]): HTMLElement {
  return h(
    'div',
    { class: `notice notice-${kind}`, role: kind === 'error' ? 'alert' : 'note' },
    ...children,
  );
}
