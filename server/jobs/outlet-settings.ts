/**
 * An outlet's action threshold, set by the API (PUT /api/outlets/:id/settings) and the CLI
 * (`efflux outlet threshold`) alike. It lives in the vessel file, so setting it is a vessel
 * update: a new revision, audited as `vessel.update`.
 */
import { InputError } from '../core/errors.js';
import { checkVesselFile } from '../core/vessel/service-file.js';
import type { Actor, Store } from '../store/index.js';
import { ConflictError } from '../store/errors.js';
import { outletsOf, type Outlet } from '../store/vessels.js';

export async function setOutletThreshold(
  store: Store,
  actor: Actor,
  outletId: number,
  actionThreshold: number | null,
): Promise<Outlet> {
  const o = await store.vessels.outlet(outletId);
  if (o.retiredAt !== null)
    throw new ConflictError(`outlet ${o.id} is retired; it is no longer in the vessel file`);
  const v = await store.vessels.get(o.vesselId);
  const spec = structuredClone(v.spec);
  const list = Array.isArray(spec.outlets)
    ? (spec.outlets as Record<string, unknown>[])
    : [spec.outlet as Record<string, unknown>];
  const at = outletsOf(spec).findIndex((x) => x.key === o.key);
  if (at < 0)
    throw new InputError(`outlet "${o.key}" is not in vessel ${v.id}'s file`, { field: 'id' });
  if (actionThreshold === null) delete list[at].actionThreshold;
  else list[at].actionThreshold = actionThreshold;
  const updated = await store.vessels.update(actor, v.id, checkVesselFile(spec));
  return updated.outlets.find((x) => x.id === o.id)!;
}
