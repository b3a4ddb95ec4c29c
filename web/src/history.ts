/** A vessel's tests and fits joined: what the fleet table and the vessel page both show. */
import {
  api,
  optional,
  type DrainTest,
  type FleetStatusItem,
  type Fit,
  type Outlet,
  type Page,
} from './api.js';
import { duration } from './format.js';

export interface TestedFit {
  fit: Fit;
  test: DrainTest | undefined;
  /** When the test was run: as stated at upload, else the log's own clock, else the upload time. */
  at: string;
}

export async function vesselHistory(
  vesselId: number,
): Promise<{ tests: DrainTest[]; fits: TestedFit[] }> {
  const [tests, fits] = await Promise.all([
    api<Page<DrainTest>>('GET', `/api/vessels/${vesselId}/tests?limit=500`),
    api<Page<Fit>>('GET', `/api/vessels/${vesselId}/fits?limit=500`),
  ]);
  const byId = new Map(tests.items.map((t) => [t.id, t]));
  const joined = fits.items.map((fit) => {
    const test = byId.get(fit.testId);
    const at =
      test?.testedAt ??
      fit.result.window?.startTime ??
      fit.result.read?.t0 ??
      test?.createdAt ??
      fit.createdAt;
    return { fit, test, at };
  });
  return { tests: tests.items, fits: joined };
}

/** The fits that stand for their test: the latest of each test's refits (the others are superseded). */
export const current = (fits: TestedFit[]) =>
  fits.filter((f) => f.fit.supersededBy === null && f.fit.status !== 'rejected');

/** The one to quote for an outlet: the latest approved, else the latest draft. */
export function latestFor(outlet: Outlet | null, fits: TestedFit[]): TestedFit | null {
  const mine = current(fits).filter(
    (f) => outlet === null || f.fit.outletId === outlet.id || f.fit.outletId === null,
  );
  const newest = (xs: TestedFit[]) =>
    xs.sort((a, b) => Date.parse(b.at) - Date.parse(a.at))[0] ?? null;
  return newest(mine.filter((f) => f.fit.status === 'approved')) ?? newest(mine);
}

/** Drift status per outlet from GET /api/fleet when the service offers it (the trend work); empty otherwise. */
export async function fleetDrift(): Promise<Map<number, FleetStatusItem>> {
  const f = await optional<Page<FleetStatusItem>>('/api/fleet?limit=500');
  return new Map((f?.items ?? []).map((i) => [i.outletId, i]));
}

export function driftWords(d: FleetStatusItem | undefined): string | null {
  if (!d) return null;
  return d.daysToThreshold !== null && Number.isFinite(d.daysToThreshold)
    ? `${d.status} (threshold in about ${duration(d.daysToThreshold)})`
    : d.status;
}
