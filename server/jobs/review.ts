/**
 * A review that may change an outlet's trend status. In ONE write transaction: the status before,
 * the review, the status after (cached), and, when the word changed, a status-change row with its
 * audit entry. The webhook notice is queued only after that transaction has committed, and the
 * queue never holds up the caller.
 */
import type { Actor, Store } from '../store/index.js';
import type { StoredFit } from '../store/fits.js';
import type { StatusChange } from '../store/trends.js';
import type { Notifier, StatusNotice } from './alerts.js';
import { computeStatus, refreshStatus } from './trend.js';

export interface ReviewOutcome {
  fit: StoredFit;
  change: StatusChange | null;
}

export async function reviewFit(
  store: Store,
  notifier: Notifier,
  actor: Actor,
  fitId: number,
  decision: 'approved' | 'rejected',
  comment: string | null,
  nowMs: number,
): Promise<ReviewOutcome> {
  let notice: StatusNotice | null = null;
  const outcome = await store.sql.tx(async (): Promise<ReviewOutcome> => {
    const outletId = (await store.fits.get(fitId)).outletId;
    const tracked = decision === 'approved' && outletId !== null;
    const before = tracked ? (await computeStatus(store, outletId, nowMs)).status : null;
    const fit = await store.fits.review(actor, fitId, decision, comment);
    if (!tracked) return { fit, change: null };
    const after = (await refreshStatus(store, outletId, nowMs)).status;
    if (after.status === before!.status) return { fit, change: null };
    const change = await store.trends.recordStatusChange(actor, {
      outletId,
      fitId,
      fromStatus: before!.status,
      toStatus: after.status,
      reason: after.reason,
      daysToThreshold: after.daysToThreshold,
    });
    const o = await store.vessels.outlet(outletId);
    const v = await store.vessels.get(o.vesselId);
    notice = {
      type: 'efflux.outlet.status-change',
      id: change.id,
      at: change.at,
      outlet: { id: o.id, key: o.key, vesselId: v.id, vesselName: v.name, site: v.site },
      fitId,
      from: change.fromStatus,
      to: change.toStatus,
      reason: change.reason,
      daysToThreshold: change.daysToThreshold,
      crossingAt: after.crossingAt,
    };
    return { fit, change };
  });
  if (notice) notifier.notify(notice); // committed: now tell the receivers
  return outcome;
}
