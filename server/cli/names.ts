/** Outlets, vessels and sites as a person types them on the command line (rules in core/vessel/names.ts). */
import { InputError } from '../core/errors.js';
import {
  matchSites,
  resolveOutletName,
  resolveVesselName,
  type OutletName,
} from '../core/vessel/names.js';
import type { Store } from '../store/index.js';

export async function outletByName(store: Store, ref: string, site?: string): Promise<OutletName> {
  let outlets = await store.names.outlets();
  if (site !== undefined) {
    const sites = matchSites(site, await store.names.sites());
    outlets = outlets.filter((o) => sites.includes(o.site));
  }
  return resolveOutletName(ref, outlets, 'outlet');
}

export async function vesselByName(store: Store, ref: string) {
  return resolveVesselName(ref, await store.names.outlets(), 'vessel');
}

/** The sites a --site filter matches, said in one line on `say` (which sites were taken). */
export async function sitesByPart(
  store: Store,
  part: string,
  say: (line: string) => void,
): Promise<string[]> {
  const sites = matchSites(part, await store.names.sites());
  say(
    `site filter "${part}" matched ${sites.length === 1 ? 'site' : `${sites.length} sites`}: ${sites.join('; ')}`,
  );
  return sites;
}

/** A store refusal (no such record, a clash) as the CLI's input refusal: one line, exit 2. */
export async function refusalsAsInput<T>(body: () => Promise<T>): Promise<T> {
  try {
    return await body();
  } catch (e) {
    if (e instanceof Error && (e.name === 'NotFoundError' || e.name === 'ConflictError'))
      throw new InputError(e.message);
    throw e;
  }
}
