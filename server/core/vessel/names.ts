/**
 * How a person names an outlet or a site on the command line: an outlet by its id, by the tag
 * painted on it (the outlet's `id` in the vessel file), by its vessel's tag when the vessel has one
 * outlet, or as VESSEL/OUTLET; a site by any part of its name, in any case. Pure: the shell hands
 * in the candidates.
 */
import { InputError } from '../errors.js';

export interface OutletName {
  outletId: number;
  /** The outlet's tag in its vessel file ("main" for a single unnamed outlet). */
  key: string;
  vesselId: number;
  vesselName: string;
  /** The vessel file's `tag`, when it has one. */
  vesselTag: string | null;
  site: string;
  retired: boolean;
}

const same = (a: string, b: string) => a.toLocaleLowerCase('en') === b.toLocaleLowerCase('en');

/** How a candidate is written back to the person: VESSEL-TAG/OUTLET (or the vessel's name). */
export const outletLabel = (o: OutletName) =>
  `${o.vesselTag ?? o.vesselName}/${o.key} (outlet ${o.outletId}, ${o.vesselName}, site ${o.site}${o.retired ? ', retired' : ''})`;

/** Thrown when a name fits several outlets or sites: the message lists them (exit 2). */
export class AmbiguousNameError extends InputError {
  constructor(
    message: string,
    readonly candidates: string[],
    field: string,
  ) {
    super(`${message}:\n  ${candidates.join('\n  ')}`, { field });
    this.name = 'AmbiguousNameError';
  }
}

/**
 * The one outlet `ref` names. A whole number is an outlet id. Otherwise, case-insensitively:
 * "VESSEL/OUTLET" (vessel tag or name, outlet tag); else an outlet tag; else a vessel tag or name
 * whose vessel has one outlet in service. Retired outlets count only when nothing in service
 * matches. No match or several: InputError naming the field (several: each candidate listed).
 */
export function resolveOutletName(
  ref: string,
  outlets: readonly OutletName[],
  field = 'outlet',
): OutletName {
  const text = ref.trim();
  if (/^\d+$/.test(text)) {
    const hit = outlets.find((o) => o.outletId === Number(text));
    if (!hit) throw new InputError(`outlet ${text} not found`, { field });
    return hit;
  }
  const vesselIs = (o: OutletName, v: string) =>
    (o.vesselTag !== null && same(o.vesselTag, v)) || same(o.vesselName, v);
  const pick = (match: (o: OutletName) => boolean): OutletName[] => {
    const all = outlets.filter(match);
    const live = all.filter((o) => !o.retired);
    return live.length > 0 ? live : all;
  };
  let found: OutletName[] = [];
  const slash = text.lastIndexOf('/');
  if (slash > 0) {
    const v = text.slice(0, slash);
    const k = text.slice(slash + 1);
    found = pick((o) => vesselIs(o, v) && same(o.key, k));
  }
  if (found.length === 0) found = pick((o) => same(o.key, text));
  if (found.length === 0) found = pick((o) => vesselIs(o, text));
  if (found.length === 1) return found[0];
  if (found.length === 0)
    throw new InputError(
      `no outlet tagged "${text}" (give an outlet id, an outlet tag, a vessel tag, or VESSEL/OUTLET)`,
      { field },
    );
  throw new AmbiguousNameError(
    `"${text}" names ${found.length} outlets; give the outlet id or VESSEL/OUTLET`,
    found.map(outletLabel),
    field,
  );
}

/**
 * The sites whose name contains `part`, ignoring case (an exact match alone wins over longer
 * names containing it). None: InputError listing the sites there are.
 */
export function matchSites(part: string, sites: readonly string[], field = 'site'): string[] {
  const p = part.trim().toLocaleLowerCase('en');
  if (p === '') throw new InputError('the site filter is empty', { field });
  const exact = sites.filter((s) => s.toLocaleLowerCase('en') === p);
  if (exact.length > 0) return exact;
  const hits = sites.filter((s) => s.toLocaleLowerCase('en').includes(p));
  if (hits.length === 0)
    throw new InputError(
      `no site name contains "${part}"; the sites are: ${sites.length ? sites.join(', ') : '(none yet)'}`,
      { field },
    );
  return hits;
}

/** A vessel as the person names it: its id, its tag or its name (any case). */
export function resolveVesselName(
  ref: string,
  outlets: readonly OutletName[],
  field = 'vessel',
): { vesselId: number; vesselName: string; vesselTag: string | null; site: string } {
  const byId = new Map<number, OutletName>();
  for (const o of outlets) if (!byId.has(o.vesselId)) byId.set(o.vesselId, o);
  const vessels = [...byId.values()];
  const text = ref.trim();
  const pickOne = (found: OutletName[]) => {
    if (found.length === 1) return found[0];
    if (found.length === 0) return null;
    throw new AmbiguousNameError(
      `"${text}" names ${found.length} vessels; give the vessel id`,
      found.map(
        (v) =>
          `${v.vesselTag ?? v.vesselName} (vessel ${v.vesselId}, ${v.vesselName}, site ${v.site})`,
      ),
      field,
    );
  };
  const hit = /^\d+$/.test(text)
    ? (byId.get(Number(text)) ?? null)
    : (pickOne(vessels.filter((v) => v.vesselTag !== null && same(v.vesselTag, text))) ??
      pickOne(vessels.filter((v) => same(v.vesselName, text))));
  if (!hit) throw new InputError(`no vessel "${text}" (give its id, tag or name)`, { field });
  return {
    vesselId: hit.vesselId,
    vesselName: hit.vesselName,
    vesselTag: hit.vesselTag,
    site: hit.site,
  };
}
