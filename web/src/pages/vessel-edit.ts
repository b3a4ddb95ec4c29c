/**
 * Create or edit a vessel (#/vessels/new, #/vessels/ID/edit): site, name, tag, the shape with the
 * fields its kind takes, outlets, sensor and liquid, each length in the unit the person picks. The
 * form is checked as it is typed by the service's own vessel-file check (server/core/vessel,
 * bundled here, not copied), the to-scale drawing follows every change, and saving stores a new
 * revision (earlier ones are listed and can be downloaded). A vessel file can be imported into the
 * form and the form exported as one.
 */
import { OUTLET_TYPES } from '../../../server/core/vessel/schema.js';
import { shapeSchema } from '../../../server/core/vessel/shape-schema.js';
import {
  vesselFileProblems,
  type VesselFileProblem,
} from '../../../server/core/vessel/service-file.js';
import {
  formatLengthEntry,
  LENGTH_ENTRY_UNIT_NAMES,
  LENGTH_ENTRY_UNITS,
  parseLengthEntry,
  type LengthEntryUnit,
} from '../../../server/core/units/length-entry.js';
import { api, ApiError, type User, type Vessel } from '../api.js';
import { clear, field, h, notice, select, table } from '../dom.js';
import { vesselDrawing } from '../drawing.js';
import { date, outletName, shapeName } from '../format.js';
import type { PageContext } from '../main.js';

type Spec = Record<string, unknown>;
const obj = (v: unknown): Spec =>
  v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Spec) : {};

export const canEditVessels = (u: User) => u.role === 'engineer' || u.role === 'admin';

/** The shape kinds and, for each, its fields: read from the one shape schema. */
const KINDS = shapeSchema.options.map((o) => {
  const keys = Object.keys(o.shape).filter((k) => k !== 'kind');
  return {
    kind: o.shape.kind.value as string,
    fields: keys.map((k) => ({
      key: k,
      optional: (o.shape as Record<string, { safeParse: (v: unknown) => { success: boolean } }>)[
        k
      ].safeParse(undefined).success,
    })),
  };
});

const LABELS: Record<string, string> = {
  diameterM: 'Diameter',
  heightM: 'Height (optional)',
  lengthM: 'Length',
  widthM: 'Width',
  coneHeightM: 'Cone height',
  diameterToleranceM: 'Diameter tolerance ±',
  lengthToleranceM: 'Length tolerance ±',
  widthToleranceM: 'Width tolerance ±',
  coneHeightToleranceM: 'Cone height tolerance ±',
  boreM: 'Bore',
  boreToleranceM: 'Bore tolerance ±',
  elevationM: 'Centreline above the bottom',
  zeroElevationM: 'Sensor zero above the bottom',
  mountElevationM: 'Gauge face above the bottom',
};

interface LengthControl {
  input: HTMLInputElement;
  unit: HTMLSelectElement;
}

/** The page's controls, by the dotted field path the vessel-file check names. */
class Controls {
  readonly lengths = new Map<string, LengthControl>();
  readonly others = new Map<string, HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement>();
  readonly errors = new Map<string, HTMLElement>();
  /** Text and unit typed so far, kept across a re-draw of the form (a change of kind or mode). */
  readonly typed = new Map<string, { text: string; unit: LengthEntryUnit }>();
  defaultUnit: LengthEntryUnit = 'm';

  clearAll(): void {
    for (const [path, c] of this.lengths)
      this.typed.set(path, { text: c.input.value, unit: c.unit.value as LengthEntryUnit });
    this.lengths.clear();
    this.others.clear();
    this.errors.clear();
  }

  errorSlot(path: string): HTMLElement {
    const el = h('span', { class: 'field-error', role: 'status', 'data-error-for': path });
    this.errors.set(path, el);
    return el;
  }

  length(path: string, label: string, valueM: unknown, onChange: () => void): HTMLElement {
    const kept = this.typed.get(path);
    const unit = kept?.unit ?? this.defaultUnit;
    const input = h('input', {
      type: 'text',
      name: path,
      inputmode: 'text',
      autocomplete: 'off',
      value: kept?.text ?? (typeof valueM === 'number' ? formatLengthEntry(valueM, unit) : ''),
    });
    const unitSel = select(
      `unit:${path}`,
      LENGTH_ENTRY_UNITS.map((u) => [u, LENGTH_ENTRY_UNIT_NAMES[u]]),
      unit,
    );
    unitSel.setAttribute('aria-label', `${label}: unit`);
    // a new unit rewrites the value in it, so what is shown stays the same length
    let shownUnit = unit;
    unitSel.addEventListener('change', () => {
      try {
        const m = parseLengthEntry(input.value, shownUnit);
        if (m !== null) input.value = formatLengthEntry(m, unitSel.value as LengthEntryUnit);
      } catch {
        // an unreadable entry stays as typed; its message stays beside it
      }
      shownUnit = unitSel.value as LengthEntryUnit;
      onChange();
    });
    input.addEventListener('input', onChange);
    this.lengths.set(path, { input, unit: unitSel });
    const f = field(label, input);
    const row = h('div', { class: 'length-entry' });
    input.replaceWith(row);
    row.append(input, unitSel);
    f.append(this.errorSlot(path));
    return f;
  }

  other(
    path: string,
    label: string,
    control: HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement,
    onChange: () => void,
    hint?: string,
  ): HTMLElement {
    control.setAttribute('name', path);
    control.addEventListener('input', onChange);
    control.addEventListener('change', onChange);
    this.others.set(path, control);
    const f = field(label, control, hint);
    f.append(this.errorSlot(path));
    return f;
  }

  /** Reads a length; an unreadable one is noted against its field and left out. */
  readLength(path: string, bad: VesselFileProblem[]): number | undefined {
    const c = this.lengths.get(path);
    if (!c) return undefined;
    try {
      return parseLengthEntry(c.input.value, c.unit.value as LengthEntryUnit) ?? undefined;
    } catch (e) {
      bad.push({ field: path, message: (e as Error).message });
      return undefined;
    }
  }

  readNumber(path: string, bad: VesselFileProblem[]): number | undefined {
    const c = this.others.get(path);
    const t = c?.value.trim() ?? '';
    if (t === '') return undefined;
    const v = Number(t.replace(',', '.'));
    if (!Number.isFinite(v)) {
      bad.push({ field: path, message: `must be a number (got "${t}")` });
      return undefined;
    }
    return v;
  }

  readText(path: string): string | undefined {
    const t = this.others.get(path)?.value.trim() ?? '';
    return t === '' ? undefined : t;
  }
}

const outletPath = (count: number, i: number) => (count === 1 ? 'outlet' : `outlets[${i}]`);

/** Sets `key` on `o` when the value is defined, deletes it otherwise. */
function put(o: Spec, key: string, v: unknown): void {
  if (v === undefined) delete o[key];
  else o[key] = v;
}

export async function vesselEditPage({ user, params, main, go }: PageContext): Promise<void> {
  const id = params[0] ? Number(params[0]) : null;
  const vessel = id === null ? null : await api<Vessel>('GET', `/api/vessels/${id}`);
  const may = canEditVessels(user);
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      vessel ? h('a', { href: `#/vessels/${vessel.id}` }, vessel.name) : 'New vessel',
      vessel ? ' › Edit' : '',
    ),
    h('h1', {}, vessel ? `Edit ${vessel.name}` : 'New vessel'),
    h(
      'p',
      { class: 'lede' },
      'Dimensions inside the vessel; heights above its lowest interior point. Type each length in the unit beside it (a bare number), or with its own unit: 1.8 m, 450 mm, 7 ft 6 in. Lengths are stored in metres.',
    ),
  );
  if (!may)
    main.append(
      notice(
        'info',
        'Only engineers and admins save vessels; you may fill the form and download the vessel file.',
      ),
    );

  // the vessel file being edited; fields the form does not show (notes, logger, span error…) ride along
  let base: Spec = vessel
    ? structuredClone(vessel.spec)
    : { name: '', shape: { kind: 'vertical-cylinder' }, outlet: {} };
  let outletCount = Array.isArray(base.outlets) ? (base.outlets as unknown[]).length : 1;
  const c = new Controls();

  const form = h('form', { class: 'vessel-form', novalidate: true });
  const drawingBox = h('figure', { class: 'card drawing', 'aria-live': 'polite' });
  const summary = h('div', { class: 'form-problems' });
  const saveButton = h(
    'button',
    { type: 'submit', class: 'primary', disabled: !may },
    'Save vessel',
  );
  const saved = h('div', {});

  const defaultUnit = select(
    'default-unit',
    LENGTH_ENTRY_UNITS.map((u) => [u, LENGTH_ENTRY_UNIT_NAMES[u]]),
    'm',
  );
  defaultUnit.addEventListener('change', () => {
    c.defaultUnit = defaultUnit.value as LengthEntryUnit;
    for (const l of c.lengths.values()) {
      if (l.unit.value !== c.defaultUnit) {
        l.unit.value = c.defaultUnit;
        l.unit.dispatchEvent(new Event('change'));
      }
    }
  });

  /** The vessel file the form describes now, and what could not be read. */
  function collect(): { spec: Spec; bad: VesselFileProblem[] } {
    const bad: VesselFileProblem[] = [];
    const spec: Spec = structuredClone(base);
    put(spec, 'site', c.readText('site'));
    put(spec, 'name', c.readText('name') ?? '');
    put(spec, 'tag', c.readText('tag'));
    const kind = c.readText('shape.kind') ?? 'vertical-cylinder';
    const oldShape = obj(base.shape);
    const shape: Spec = { kind };
    const k = KINDS.find((x) => x.kind === kind);
    if (kind === 'table') {
      const text = (c.others.get('shape.points') as HTMLTextAreaElement | undefined)?.value ?? '';
      const points: [number, number][] = [];
      text
        .split('\n')
        .map((l) => l.trim())
        .filter(Boolean)
        .forEach((l, i) => {
          const nums = l.split(/[\s;,]+/).map(Number);
          if (nums.length !== 2 || nums.some((x) => !Number.isFinite(x)))
            bad.push({
              field: 'shape.points',
              message: `line ${i + 1}: give a height in m and an area in m²`,
            });
          else points.push([nums[0], nums[1]]);
        });
      shape.points = points;
      if (oldShape.kind === 'table' && oldShape.pointTolerances)
        shape.pointTolerances = oldShape.pointTolerances;
    } else {
      for (const f of k?.fields ?? []) put(shape, f.key, c.readLength(`shape.${f.key}`, bad));
    }
    spec.shape = shape;

    const outlets: Spec[] = [];
    const oldOutlets = Array.isArray(base.outlets) ? (base.outlets as Spec[]) : [obj(base.outlet)];
    for (let i = 0; i < outletCount; i++) {
      const p = outletPath(outletCount, i);
      const o: Spec = { ...obj(oldOutlets[i]) };
      put(o, 'id', c.readText(`${p}.id`));
      put(o, 'type', c.readText(`${p}.type`));
      for (const key of ['boreM', 'boreToleranceM', 'elevationM'])
        put(o, key, c.readLength(`${p}.${key}`, bad));
      put(o, 'actionThreshold', c.readNumber(`${p}.actionThreshold`, bad));
      outlets.push(o);
    }
    delete spec.outlet;
    delete spec.outlets;
    if (outletCount === 1) spec.outlet = outlets[0];
    else spec.outlets = outlets;

    const sensorMode = c.readText('sensor.mode') ?? 'zero';
    const sensor: Spec = { ...obj(base.sensor) };
    delete sensor.zeroElevationM;
    delete sensor.mountElevationM;
    if (sensorMode === 'zero') {
      delete sensor.mountElevationToleranceM;
      put(sensor, 'zeroElevationM', c.readLength('sensor.zeroElevationM', bad));
    } else if (sensorMode === 'mount') {
      delete sensor.zeroElevationToleranceM;
      put(sensor, 'mountElevationM', c.readLength('sensor.mountElevationM', bad));
    }
    put(spec, 'sensor', Object.keys(sensor).length ? sensor : undefined);

    const fluidMode = c.readText('fluid.mode') ?? 'none';
    const oldFluid = obj(base.fluid);
    if (fluidMode === 'temperature') {
      const f: Spec = { temperatureC: c.readNumber('fluid.temperatureC', bad) };
      if (oldFluid.temperatureToleranceC !== undefined)
        f.temperatureToleranceC = oldFluid.temperatureToleranceC;
      spec.fluid = f;
    } else if (fluidMode === 'density') {
      const f: Spec = { densityKgM3: c.readNumber('fluid.densityKgM3', bad) };
      if (oldFluid.densityToleranceKgM3 !== undefined)
        f.densityToleranceKgM3 = oldFluid.densityToleranceKgM3;
      spec.fluid = f;
    } else delete spec.fluid;
    return { spec, bad };
  }

  /** Every problem beside its field (the service's own check), and the drawing redrawn. */
  function check(): { spec: Spec; ok: boolean } {
    const { spec, bad } = collect();
    const problems = [...bad, ...vesselFileProblems(spec)];
    for (const el of c.errors.values()) el.textContent = '';
    const unplaced: VesselFileProblem[] = [];
    for (const p of problems) {
      // the check names a field exactly, or an object whose field is missing in the form
      const slot =
        c.errors.get(p.field) ??
        [...c.errors.entries()].find(([path]) => p.field.startsWith(`${path}.`))?.[1];
      if (slot) {
        if (slot.textContent === '') slot.textContent = p.message;
      } else unplaced.push(p);
    }
    for (const [path, el] of c.errors) {
      const control = c.lengths.get(path)?.input ?? c.others.get(path);
      control?.setAttribute('aria-invalid', el.textContent ? 'true' : 'false');
    }
    clear(summary);
    if (unplaced.length)
      summary.append(
        notice(
          'error',
          ...unplaced.map((p) => h('div', {}, p.field ? `${p.field}: ${p.message}` : p.message)),
        ),
      );
    clear(drawingBox);
    try {
      const o = (spec.outlets ?? [spec.outlet]) as Spec[];
      const sensor = obj(spec.sensor);
      drawingBox.append(
        vesselDrawing(spec, {
          outlets: o.map((x, i) => ({
            name: typeof x.id === 'string' ? x.id : `outlet ${i + 1}`,
            elevationM: typeof x.elevationM === 'number' ? x.elevationM : 0,
          })),
          sensorZeroM: typeof sensor.zeroElevationM === 'number' ? sensor.zeroElevationM : null,
          mountElevationM:
            typeof sensor.mountElevationM === 'number' ? sensor.mountElevationM : null,
        }),
        h('figcaption', {}, 'Drawn to scale from the form'),
      );
    } catch {
      drawingBox.append(h('figcaption', {}, 'The drawing follows once the shape is complete.'));
    }
    const ok = problems.length === 0;
    saveButton.disabled = !may || !ok;
    return { spec, ok };
  }

  /** Draws the whole form from a vessel file (on open, import, a change of kind, mode or outlets). */
  function draw(spec: Spec): void {
    c.clearAll();
    clear(form);
    const on = () => check();
    const redraw = () => {
      const { spec: now } = collect();
      base = now;
      draw(now);
    };
    const shape = obj(spec.shape);
    const kind = String(shape.kind ?? 'vertical-cylinder');
    const kindSel = select(
      'shape.kind',
      KINDS.map((x) => [x.kind, shapeName(x.kind)]),
      kind,
    );
    kindSel.addEventListener('change', redraw);
    const sensor = obj(spec.sensor);
    const sensorMode =
      typeof sensor.mountElevationM === 'number'
        ? 'mount'
        : 'zeroElevationM' in sensor || !spec.sensor
          ? 'zero'
          : 'none';
    const fluid = obj(spec.fluid);
    const fluidMode =
      'densityKgM3' in fluid ? 'density' : 'temperatureC' in fluid ? 'temperature' : 'none';

    const k = KINDS.find((x) => x.kind === kind);
    const shapeFields =
      kind === 'table'
        ? [
            c.other(
              'shape.points',
              'Stage–area table',
              h(
                'textarea',
                { rows: 6 },
                (Array.isArray(shape.points) ? (shape.points as number[][]) : [])
                  .map((p) => `${p[0]} ${p[1]}`)
                  .join('\n'),
              ),
              on,
              'One line per surveyed height: height above the bottom in m, then the plan area in m².',
            ),
          ]
        : (k?.fields ?? []).map((f) =>
            c.length(`shape.${f.key}`, LABELS[f.key] ?? f.key, shape[f.key], on),
          );

    const outlets = (Array.isArray(spec.outlets) ? spec.outlets : [spec.outlet]).map(obj);
    outletCount = outlets.length;
    const outletSets = outlets.map((o, i) => {
      const p = outletPath(outletCount, i);
      const remove =
        outletCount > 1
          ? h('button', { type: 'button', class: 'quiet' }, `Remove outlet ${i + 1}`)
          : null;
      remove?.addEventListener('click', () => {
        const { spec: now } = collect();
        const list = (now.outlets as Spec[]).filter((_, j) => j !== i);
        delete now.outlets;
        if (list.length === 1) now.outlet = list[0];
        else now.outlets = list;
        for (const key of [...c.typed.keys()]) if (key.startsWith('outlet')) c.typed.delete(key);
        base = now;
        draw(now);
      });
      return h(
        'fieldset',
        {},
        h('legend', {}, outletCount > 1 ? `Outlet ${i + 1}` : 'Outlet'),
        h(
          'div',
          { class: 'grid' },
          c.other(
            `${p}.id`,
            'Tag',
            h('input', { type: 'text', value: String(o.id ?? '') }),
            on,
            'As painted on the outlet, e.g. V-12',
          ),
          c.other(
            `${p}.type`,
            'Kind',
            select(
              `${p}.type`,
              [
                ['', 'not stated'],
                ...OUTLET_TYPES.map((t) => [t, outletName(t)] as [string, string]),
              ],
              String(o.type ?? ''),
            ),
            on,
          ),
          c.length(`${p}.boreM`, LABELS.boreM, o.boreM, on),
          c.length(`${p}.boreToleranceM`, LABELS.boreToleranceM, o.boreToleranceM, on),
          c.length(`${p}.elevationM`, LABELS.elevationM, o.elevationM, on),
          c.other(
            `${p}.actionThreshold`,
            'Action threshold (× baseline Cd·a)',
            h('input', {
              type: 'text',
              inputmode: 'decimal',
              value: typeof o.actionThreshold === 'number' ? String(o.actionThreshold) : '',
            }),
            on,
            'Below 1 for fouling (0.9), above 1 for erosion (1.1); empty for the default.',
          ),
        ),
        remove,
      );
    });
    const addOutlet = h('button', { type: 'button' }, 'Add an outlet');
    addOutlet.addEventListener('click', () => {
      const { spec: now } = collect();
      const list = Array.isArray(now.outlets) ? (now.outlets as Spec[]) : [obj(now.outlet)];
      delete now.outlet;
      now.outlets = [...list, {}];
      for (const key of [...c.typed.keys()]) if (key.startsWith('outlet')) c.typed.delete(key);
      base = now;
      draw(now);
    });

    const sensorSel = select(
      'sensor.mode',
      [
        ['zero', 'level measured up from a zero'],
        ['mount', 'gauge on the roof, reading down'],
        ['none', 'zero not known (fit it)'],
      ],
      sensorMode,
    );
    sensorSel.addEventListener('change', redraw);
    const fluidSel = select(
      'fluid.mode',
      [
        ['none', 'water at 20 °C (assumed)'],
        ['temperature', 'water at a stated temperature'],
        ['density', 'a liquid of stated density'],
      ],
      fluidMode,
    );
    fluidSel.addEventListener('change', redraw);

    form.append(
      h(
        'fieldset',
        {},
        h('legend', {}, 'Vessel'),
        h(
          'div',
          { class: 'grid' },
          c.other(
            'site',
            'Site',
            h('input', { type: 'text', value: String(spec.site ?? '') }),
            on,
            'Empty: "main"',
          ),
          c.other('name', 'Name', h('input', { type: 'text', value: String(spec.name ?? '') }), on),
          c.other(
            'tag',
            'Tag',
            h('input', { type: 'text', value: String(spec.tag ?? '') }),
            on,
            'As painted on the vessel, e.g. D-2',
          ),
          field('Lengths in (every field below)', defaultUnit),
        ),
      ),
      h(
        'fieldset',
        {},
        h('legend', {}, 'Shape'),
        h(
          'div',
          { class: 'grid' },
          c.other('shape.kind', 'Kind', kindSel, () => undefined),
          ...shapeFields,
        ),
      ),
      ...outletSets,
      addOutlet,
      h(
        'fieldset',
        {},
        h('legend', {}, 'Level sensor'),
        h(
          'div',
          { class: 'grid' },
          c.other('sensor.mode', 'How the level is read', sensorSel, () => undefined),
          sensorMode === 'zero'
            ? c.length('sensor.zeroElevationM', LABELS.zeroElevationM, sensor.zeroElevationM, on)
            : sensorMode === 'mount'
              ? c.length(
                  'sensor.mountElevationM',
                  LABELS.mountElevationM,
                  sensor.mountElevationM,
                  on,
                )
              : null,
        ),
      ),
      h(
        'fieldset',
        {},
        h('legend', {}, 'Liquid'),
        h(
          'div',
          { class: 'grid' },
          c.other('fluid.mode', 'Liquid', fluidSel, () => undefined),
          fluidMode === 'temperature'
            ? c.other(
                'fluid.temperatureC',
                'Water temperature (°C)',
                h('input', {
                  type: 'text',
                  inputmode: 'decimal',
                  value: fluid.temperatureC === undefined ? '' : String(fluid.temperatureC),
                }),
                on,
              )
            : fluidMode === 'density'
              ? c.other(
                  'fluid.densityKgM3',
                  'Density (kg/m³)',
                  h('input', {
                    type: 'text',
                    inputmode: 'decimal',
                    value: fluid.densityKgM3 === undefined ? '' : String(fluid.densityKgM3),
                  }),
                  on,
                )
              : null,
        ),
      ),
      summary,
      h('p', { class: 'actions' }, saveButton),
      saved,
    );
    check();
  }

  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    const { spec, ok } = check();
    if (!ok || !may) return;
    saveButton.disabled = true;
    clear(saved);
    try {
      const v = vessel
        ? await api<Vessel>('PUT', `/api/vessels/${vessel.id}`, spec)
        : await api<Vessel>('POST', '/api/vessels', spec);
      go(`#/vessels/${v.id}`);
    } catch (err) {
      saved.append(notice('error', err instanceof ApiError ? err.message : String(err)));
      saveButton.disabled = false;
    }
  });

  // import and export of the vessel file
  const importInput = h('input', {
    type: 'file',
    accept: '.json,application/json',
    name: 'import',
  });
  const importMsg = h('span', { class: 'hint', role: 'status' });
  importInput.addEventListener('change', async () => {
    const file = importInput.files?.[0];
    if (!file) return;
    clear(importMsg);
    try {
      const value = JSON.parse((await file.text()).replace(/^\uFEFF/, ''));
      if (!value || typeof value !== 'object' || Array.isArray(value))
        throw new Error('a vessel file is a JSON object');
      c.typed.clear();
      base = value as Spec;
      draw(base);
      importMsg.textContent = `Read ${file.name}; check the fields, then save.`;
    } catch (err) {
      importMsg.textContent = `${file.name}: not a vessel file (${(err as Error).message})`;
    }
  });
  const exportButton = h('button', { type: 'button' }, 'Download vessel file');
  exportButton.addEventListener('click', () => {
    const { spec } = collect();
    download(spec, fileNameOf(spec));
  });

  main.append(
    h('section', { class: 'vessel-top' }, h('div', {}, form), h('div', {}, drawingBox)),
    h(
      'section',
      {},
      h('h2', {}, 'Vessel file'),
      h('p', {}, field('Read a vessel file into the form', importInput), importMsg),
      h('p', {}, exportButton),
    ),
  );
  draw(base);
  if (vessel) main.append(await revisionsSection(vessel));
}

const fileNameOf = (spec: Spec) =>
  `${String(spec.tag ?? spec.name ?? 'vessel').replace(/[^\w.-]+/g, '-') || 'vessel'}.vessel.json`;

function download(spec: Spec, name: string): void {
  const url = URL.createObjectURL(
    new Blob([`${JSON.stringify(spec, null, 2)}\n`], { type: 'application/json' }),
  );
  const a = h('a', { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

interface RevisionInfo {
  revision: number;
  savedAt: string;
  savedBy: string | null;
  fitIds: number[];
}

/** Every saved revision: when, by whom, the fits made with it, and its file to download. */
export async function revisionsSection(vessel: Vessel): Promise<HTMLElement> {
  const { items } = await api<{ items: RevisionInfo[] }>(
    'GET',
    `/api/vessels/${vessel.id}/revisions`,
  );
  return h(
    'section',
    { class: 'revisions' },
    h('h2', {}, 'Revisions of the vessel file'),
    h(
      'p',
      { class: 'hint' },
      'Each save is a new revision; a fit keeps the revision it was computed with.',
    ),
    table(
      null,
      ['Revision', 'Saved', 'By', 'Fits made with it', 'File'],
      items.map((r) => {
        const get = h(
          'button',
          { type: 'button', class: 'quiet' },
          `Download revision ${r.revision}`,
        );
        get.addEventListener('click', async () => {
          const rev = await api<{ spec: Spec }>(
            'GET',
            `/api/vessels/${vessel.id}/revisions/${r.revision}`,
          );
          download(
            rev.spec,
            fileNameOf(rev.spec).replace(/\.vessel\.json$/, `.rev${r.revision}.vessel.json`),
          );
        });
        return [
          `${r.revision}${r.revision === vessel.revision ? ' (current)' : ''}`,
          date(r.savedAt),
          r.savedBy ?? '—',
          r.fitIds.length
            ? h(
                'span',
                {},
                ...r.fitIds.flatMap((f, i) => [
                  i ? ', ' : '',
                  h('a', { href: `#/fits/${f}` }, `fit ${f}`),
                ]),
              )
            : 'none',
          get,
        ];
      }),
    ),
  );
}
