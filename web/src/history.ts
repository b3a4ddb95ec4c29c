/** A vessel's tests and fits joined: what the fleet table and the vessel page both show. */
import { api, type DrainTest, type Fit, type Outlet, type Page } from './api.js';

export interface TestedFit {
  fit: Fit;
  test: DrainTest | undefined;
  /** When the test was run: as stated at upload, else the log's own clock, else the upload time. */
  at: string;
}

export async function vesselHistory(vesselId: number): Promise<{ tests: DrainTest[]; fits: TestedFit[] }> {
  const [tests, fits] = await Promise.all([
    api<Page<DrainTest>>('GET', `/api/vessels/${vesselId}/tests?limit=500`),
    api<Page<Fit>>('GET', `/api/vessels/${vesselId}/fits?limit=500`),
  ]);
  const byId = new Map(tests.items.map((t) => [t.id, t]));
  const joined = fits.items.map((fit) => {
    const test = byId.get(fit.testId);
    const at = test?.testedAt ?? fit.result.window?.startTime ?? fit.result.read?.t0 ?? test?.createdAt ?? fit.createdAt;
    return { fit, test, at };
  });
  return { tests: tests.items, fits: joined };
}

/** The fits that stand for their test: the latest of each test's refits (the others are superseded). */
export const current = (fits: TestedFit[]) => fits.filter((f) => f.fit.supersededBy === null && f.fit.status !== 'rejected');

/** The one to quote for an outlet: the latest approved, else the latest draft. */
export function latestFor(outlet: Outlet | null, fits: TestedFit[]): TestedFit | null {
  const mine = current(fits).filter((f) => outlet === null || f.fit.outletId === outlet.id || f.fit.outletId === null);
  const newest = (xs: TestedFit[]) => xs.sort((a, b) => Date.parse(b.at) - Date.parse(a.at))[0] ?? null;
  return newest(mine.filter((f) => f.fit.status === 'approved')) ?? newest(mine);
}

/** A drift status when the service offers one on the outlet (the trend work); null until then. */
export function driftOf(outlet: Outlet): string | null {
  const o = outlet as Record<string, unknown>;
  const t = (o.trend ?? o.drift) as Record<string, unknown> | string | undefined;
  if (typeof t === 'string') return t;
  if (t && typeof t.status === 'string') return t.status;
  if (typeof o.driftStatus === 'string') return o.driftStatus;
  return null;
}
