/**
 * `efflux vessel add|list|show|export|edit|revisions` and `efflux outlet threshold`: vessels and
 * outlets in the data folder `efflux serve` uses (--data DIR, else EFFLUX_DATA_DIR, else ./data),
 * through the same store calls as the API, audited as the system (like `efflux people`).
 */
import { writeFileSync } from 'node:fs';
import { InputError } from '../core/errors.js';
import { checkVesselFile } from '../core/vessel/service-file.js';
import { setOutletThreshold } from '../jobs/outlet-settings.js';
import { thresholdOf } from '../jobs/trend.js';
import { openStore, SYSTEM_ACTOR, type Store } from '../store/index.js';
import type { Vessel } from '../store/vessels.js';
import { guarded, readInputFile } from './io.js';
import { outletByName, refusalsAsInput, sitesByPart, vesselByName } from './names.js';
import { parseCommandLine } from './options.js';
import { dataDir } from './serve-config.js';

const VESSEL_USAGE = `usage:
  efflux vessel add FILE                       store a vessel file (revision 1)
  efflux vessel list [--site PART] [--json]    vessels with their outlets
  efflux vessel show ID|TAG|NAME [--json]      one vessel: outlets, revisions, the file
  efflux vessel export ID|TAG|NAME [--revision N] [--out FILE]
                                               the vessel file as saved (SI units), to stdout or FILE
  efflux vessel edit ID|TAG|NAME FILE          replace the vessel file: a new revision
  efflux vessel revisions ID|TAG|NAME          every saved revision, who saved it, the fits made with it
Options: --data DIR (else EFFLUX_DATA_DIR, else ./data). A vessel file is JSON in SI units
(README, "The vessel file"); writes are recorded in the audit log as the system.
`;

const OUTLET_USAGE = `usage:
  efflux outlet threshold OUTLET FACTOR|default   the action threshold: the baseline Cd·a times
                                                  FACTOR (below 1 fouling, above 1 erosion)
OUTLET is an outlet id, its tag (as in the vessel file), a vessel tag with one outlet, or
VESSEL/OUTLET; --site PART narrows the search. Options: --data DIR.
`;

const OPTIONS = {
  data: { type: 'string' },
  site: { type: 'string' },
  json: { type: 'boolean' },
  out: { type: 'string' },
  revision: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

const say = (line: string) => process.stdout.write(`${line}\n`);

function readVesselFile(path: string): Record<string, unknown> {
  const { bytes, fileName } = readInputFile(path, 1024 * 1024);
  const text = new TextDecoder().decode(bytes).replace(/^\uFEFF/, '');
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new InputError(`not valid JSON: ${(e as Error).message}`, { file: fileName });
  }
  return checkVesselFile(value, fileName);
}

function summary(v: Vessel): string[] {
  const tag = typeof v.spec.tag === 'string' ? ` [${v.spec.tag}]` : '';
  const shape = v.spec.shape as Record<string, unknown>;
  const dims = Object.entries(shape)
    .filter(([k]) => k !== 'kind' && k !== 'points' && k !== 'pointTolerances')
    .map(([k, x]) => `${k} ${x}`)
    .join(', ');
  const out = [
    `vessel ${v.id}${tag} "${v.name}", site ${v.site}, revision ${v.revision} (saved ${v.updatedAt})`,
    `  shape: ${shape.kind}${dims ? ` (${dims})` : ''}`,
  ];
  for (const o of v.outlets)
    out.push(
      `  outlet ${o.id} "${o.key}": ${o.type ?? 'type not given'}, bore ${o.boreM ?? '?'} m` +
        `${o.boreToleranceM !== null ? ` ± ${o.boreToleranceM} m` : ''}, elevation ${o.elevationM ?? '?'} m, ` +
        `threshold ${o.actionThreshold === null ? 'default' : `× ${o.actionThreshold}`}` +
        `${o.retiredAt ? `, retired ${o.retiredAt}` : ''}`,
    );
  return out;
}

async function withStore<T>(values: { data?: string }, body: (s: Store) => Promise<T>): Promise<T> {
  const store = await openStore({ dataDir: dataDir(process.env, { flag: values.data }) });
  try {
    return await refusalsAsInput(() => body(store));
  } finally {
    await store.close();
  }
}

export async function run(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, OPTIONS);
    const [sub, a, b, ...extra] = positionals;
    if (values.help || !sub) {
      process.stdout.write(VESSEL_USAGE);
      return values.help ? 0 : 2;
    }
    if (extra.length) throw new InputError(`unexpected argument "${extra[0]}" (see --help)`);
    const need = (x: string | undefined, what: string) => {
      if (x === undefined) throw new InputError(`name the ${what} (see efflux vessel --help)`);
      return x;
    };
    switch (sub) {
      case 'add': {
        const spec = readVesselFile(need(a, 'vessel file'));
        return withStore(values, async (store) => {
          const v = await store.vessels.create(SYSTEM_ACTOR, spec);
          for (const l of summary(v)) say(l);
          return 0;
        });
      }
      case 'edit': {
        const ref = need(a, 'vessel');
        const spec = readVesselFile(need(b, 'vessel file'));
        return withStore(values, async (store) => {
          const { vesselId } = await vesselByName(store, ref);
          const v = await store.vessels.update(SYSTEM_ACTOR, vesselId, spec);
          for (const l of summary(v)) say(l);
          return 0;
        });
      }
      case 'list':
        return withStore(values, async (store) => {
          const say2 = values.json ? (l: string) => process.stderr.write(`${l}\n`) : say;
          const sites = values.site ? await sitesByPart(store, values.site, say2) : null;
          const items: Vessel[] = [];
          for (let offset = 0; ; offset += 500) {
            const page = await store.vessels.list(500, offset, sites);
            items.push(...page.items);
            if (items.length >= page.total || page.items.length === 0) break;
          }
          if (values.json) say(JSON.stringify(items, null, 2));
          else
            for (const v of items) {
              const tag = typeof v.spec.tag === 'string' ? v.spec.tag : '—';
              const outs = v.outlets
                .filter((o) => o.retiredAt === null)
                .map((o) => `${o.key} (${o.id})`)
                .join(', ');
              say(
                `${String(v.id).padStart(5)}  ${tag.padEnd(8)} ${v.name.padEnd(32)} ${v.site.padEnd(32)} rev ${v.revision}  outlets: ${outs}`,
              );
            }
          return 0;
        });
      case 'show':
        return withStore(values, async (store) => {
          const { vesselId } = await vesselByName(store, need(a, 'vessel'));
          const v = await store.vessels.get(vesselId);
          if (values.json) {
            say(JSON.stringify(v, null, 2));
            return 0;
          }
          for (const l of summary(v)) say(l);
          const revs = await store.vesselRevisions.list(vesselId);
          say(
            `  revisions: ${revs.map((r) => `${r.revision} (${r.savedAt.slice(0, 10)}, ${r.fitIds.length} fit(s))`).join(', ')}`,
          );
          say('  vessel file:');
          for (const l of JSON.stringify(v.spec, null, 2).split('\n')) say(`    ${l}`);
          return 0;
        });
      case 'export':
        return withStore(values, async (store) => {
          const { vesselId } = await vesselByName(store, need(a, 'vessel'));
          let spec: Record<string, unknown>;
          if (values.revision !== undefined) {
            if (!/^\d+$/.test(values.revision))
              throw new InputError('--revision is a whole number', { field: 'revision' });
            spec = (await store.vesselRevisions.get(vesselId, Number(values.revision))).spec;
          } else spec = (await store.vessels.get(vesselId)).spec;
          const text = `${JSON.stringify(spec, null, 2)}\n`;
          if (values.out) writeFileSync(values.out, text);
          else process.stdout.write(text);
          return 0;
        });
      case 'revisions':
        return withStore(values, async (store) => {
          const { vesselId } = await vesselByName(store, need(a, 'vessel'));
          for (const r of await store.vesselRevisions.list(vesselId))
            say(
              `revision ${r.revision}  saved ${r.savedAt} by ${r.savedBy ?? '(not recorded)'}  fits: ${r.fitIds.length ? r.fitIds.join(', ') : 'none'}`,
            );
          return 0;
        });
      default:
        throw new InputError(`unknown vessel command "${sub}" (see efflux vessel --help)`);
    }
  });
}

/** `efflux outlet threshold OUTLET FACTOR|default`. */
export async function runOutlet(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, OPTIONS);
    const [sub, ref, value, ...extra] = positionals;
    if (values.help || !sub) {
      process.stdout.write(OUTLET_USAGE);
      return values.help ? 0 : 2;
    }
    if (extra.length) throw new InputError(`unexpected argument "${extra[0]}" (see --help)`);
    if (sub !== 'threshold')
      throw new InputError(`unknown outlet command "${sub}" (see efflux outlet --help)`);
    if (ref === undefined || value === undefined)
      throw new InputError('usage: efflux outlet threshold OUTLET FACTOR|default');
    let factor: number | null = null;
    if (value !== 'default') {
      factor = Number(value);
      if (!(Number.isFinite(factor) && factor > 0 && factor < 2 && factor !== 1))
        throw new InputError(
          `the threshold is the baseline Cd·a times a factor: below 1 for fouling (e.g. 0.9), above 1 for erosion (e.g. 1.1); 0 < x < 2, not 1 (got "${value}")`,
          { field: 'threshold' },
        );
    }
    return withStore(values, async (store) => {
      const o = await outletByName(store, ref, values.site);
      const after = await setOutletThreshold(store, SYSTEM_ACTOR, o.outletId, factor);
      const v = await store.vessels.get(o.vesselId);
      say(
        `outlet ${after.id} "${after.key}" of ${o.vesselName} (${o.site}): ${thresholdOf(after).source}; vessel revision ${v.revision}`,
      );
      return 0;
    });
  });
}
