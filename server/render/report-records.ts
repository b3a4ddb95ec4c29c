/**
 * Reads what a report is built from out of the store (shell side): the fit, its test and raw-file
 * hashes, the vessel and outlet, the other fits of the same test, the audit entries, user names.
 */
import type { FitJson } from '../core/analysis-contract.js';
import type {
  ApprovedFitRecord,
  AuditRecord,
  FitReportRecords,
  OutletRecord,
  OutletReportRecords,
  VesselRecord,
} from '../core/report/index.js';
import type { Store } from '../store/index.js';
import type { StoredFit } from '../store/fits.js';
import type { Outlet, Vessel } from '../store/vessels.js';

/** A user's name for the report; ids are not what an auditor reads. */
async function userName(store: Store, id: number | null): Promise<string | null> {
  if (id === null) return null;
  try {
    return (await store.users.get(id)).name;
  } catch {
    return `user ${id}`;
  }
}

const vesselRecord = (v: Vessel): VesselRecord => ({
  id: v.id,
  site: v.site,
  name: v.name,
  revision: v.revision,
  spec: v.spec,
});
const outletRecord = ({
  spec: _spec,
  vesselId: _vessel,
  ...o
}: Outlet & { vesselId?: number }): OutletRecord => o;

const numberAt = (r: Record<string, unknown>, key: string) => {
  const v = (r[key] as { value?: unknown } | null)?.value;
  return typeof v === 'number' ? v : null;
};

async function auditFor(
  store: Store,
  entityType: string,
  entityId: number,
): Promise<AuditRecord[]> {
  const out: AuditRecord[] = [];
  let afterSeq = 0;
  for (;;) {
    const page = await store.audit.list({
      entityType,
      entityId: String(entityId),
      afterSeq,
      limit: 1000,
    });
    for (const e of page)
      out.push({
        seq: e.seq,
        at: e.at,
        actor: e.actorName,
        action: e.action,
        entityType: e.entityType,
        entityId: e.entityId,
        hash: e.hash,
      });
    if (page.length < 1000) return out;
    afterSeq = page[page.length - 1].seq;
  }
}

export async function reviewOf(store: Store, f: StoredFit) {
  if (!f.review || f.status === 'draft') return null;
  // selfReview only when the approval was recorded as one (approvals made before the four-eyes rule
  // are not marked), so reports issued before it existed still rebuild to the same content
  const self = f.review.selfReview && (await approvalRecordedAsSelfReview(store, f.id));
  return {
    decision: f.status as 'approved' | 'rejected',
    by: await userName(store, f.review.by),
    at: f.review.at!,
    comment: f.review.comment,
    ...(self ? { selfReview: true as const } : {}),
  };
}

async function approvalRecordedAsSelfReview(store: Store, fitId: number): Promise<boolean> {
  const entries = await store.audit.list({
    entityType: 'fit',
    entityId: String(fitId),
    action: 'fit.approve',
    limit: 10,
  });
  return entries.some((e) => (e.after as { selfReview?: unknown } | null)?.selfReview === true);
}

export async function fitReportRecords(store: Store, fitId: number): Promise<FitReportRecords> {
  const fit = await store.fits.get(fitId);
  const test = await store.tests.get(fit.testId);
  const vessel = await store.vessels.get(fit.vesselId);
  const outlet =
    fit.outletId === null ? null : (vessel.outlets.find((o) => o.id === fit.outletId) ?? null);
  const siblings = await store.fits.listByTest(fit.testId);
  const audit = [...(await auditFor(store, 'test', test.id))];
  for (const s of siblings) audit.push(...(await auditFor(store, 'fit', s.id)));
  return {
    vessel: vesselRecord(vessel),
    outlet: outlet ? outletRecord(outlet) : null,
    test: {
      id: test.id,
      testedAt: test.testedAt,
      operator: test.operator,
      loggerId: test.loggerId,
      notes: test.notes,
      uploadedAt: test.createdAt,
      uploadedBy: await userName(store, test.createdBy),
      log: { fileName: test.fileName, size: test.size, sha256: test.sha256 },
      baro: test.baro,
      detected: test.detected,
    },
    fit: {
      id: fit.id,
      status: fit.status,
      createdAt: fit.createdAt,
      createdBy: await userName(store, fit.createdBy),
      engineVersion: fit.engineVersion,
      settings: fit.settings,
      vesselGiven: fit.vessel,
      result: fit.result as FitJson,
      review: await reviewOf(store, fit),
      supersededBy: fit.supersededBy,
    },
    history: await Promise.all(
      siblings.map(async (s) => ({
        id: s.id,
        status: s.status,
        createdAt: s.createdAt,
        createdBy: await userName(store, s.createdBy),
        supersededBy: s.supersededBy,
        dischargeCoefficient: numberAt(s.result, 'dischargeCoefficient'),
        effectiveAreaM2: numberAt(s.result, 'effectiveAreaM2'),
        settings: s.settings,
      })),
    ),
    audit,
  };
}

/** Every fit of a vessel, oldest first (the store pages newest first). */
export async function allFitsOfVessel(store: Store, vesselId: number): Promise<StoredFit[]> {
  const out: StoredFit[] = [];
  for (let offset = 0; ; offset += 500) {
    const page = await store.fits.listByVessel(vesselId, 500, offset);
    out.push(...page.items);
    if (out.length >= page.total || page.items.length === 0) break;
  }
  return out.sort((a, b) => a.id - b.id);
}

/** Approved and not superseded: the fits that count in an outlet's history. */
export const countsInHistory = (f: StoredFit) => f.status === 'approved' && f.supersededBy === null;

export async function outletReportRecords(
  store: Store,
  outletId: number,
): Promise<OutletReportRecords> {
  const outlet = await store.vessels.outlet(outletId);
  const vessel = await store.vessels.get(outlet.vesselId);
  const fits: ApprovedFitRecord[] = await Promise.all(
    (await allFitsOfVessel(store, vessel.id))
      .filter((f) => f.outletId === outletId && countsInHistory(f))
      .map(async (f) => {
        const test = await store.tests.get(f.testId);
        return {
          fitId: f.id,
          testId: test.id,
          testedAt: test.testedAt ?? test.createdAt, // only an old test no one could date lacks one (listed by efflux audit verify)
          log: { fileName: test.fileName, size: test.size, sha256: test.sha256 },
          result: f.result as FitJson,
          review: (await reviewOf(store, f))!,
        };
      }),
  );
  const events = [];
  for (let offset = 0; ; offset += 500) {
    const page = await store.events.listByVessel(vessel.id, 500, offset);
    events.push(...page.items);
    if (events.length >= page.total || page.items.length === 0) break;
  }
  return {
    vessel: vesselRecord(vessel),
    outlet: outletRecord(outlet),
    fits,
    // an event with no outlet applies to the whole vessel
    events: events
      .filter((e) => e.outletId === null || e.outletId === outletId)
      .map((e) => ({
        id: e.id,
        kind: e.kind,
        occurredAt: e.occurredAt,
        notes: e.notes,
        outletId: e.outletId,
      })),
  };
}
