/**
 * The service's HTTP API, and nothing else. The session lives in an httpOnly cookie set by
 * POST /api/session, so no token is ever kept by this script. Errors arrive as
 * application/problem+json and become ApiError with the service's own plain sentence.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly problem: Record<string, unknown> | null,
  ) {
    super(message);
  }
}

async function parse(res: Response): Promise<unknown> {
  const type = res.headers.get('content-type') ?? '';
  if (res.status === 204) return null;
  if (type.includes('json')) return res.json();
  return res.text();
}

export async function api<T>(
  method: string,
  url: string,
  body?: unknown,
  extraHeaders: Record<string, string> = {},
): Promise<T> {
  const init: RequestInit = {
    method,
    credentials: 'same-origin',
    headers: { accept: 'application/json, application/problem+json', ...extraHeaders },
  };
  if (body instanceof FormData) init.body = body;
  else if (body !== undefined) {
    init.body = JSON.stringify(body);
    (init.headers as Record<string, string>)['content-type'] = 'application/json';
  }
  const res = await fetch(url, init);
  const data = await parse(res);
  if (!res.ok) {
    const p = data && typeof data === 'object' ? (data as Record<string, unknown>) : null;
    const where = p
      ? [
          p.file,
          p.line !== undefined ? `line ${p.line}` : null,
          p.field ? `field ${p.field}` : null,
        ]
          .filter(Boolean)
          .join(', ')
      : '';
    const detail =
      (p?.detail as string) ?? (p?.title as string) ?? `the service answered ${res.status}`;
    throw new ApiError(
      res.status,
      where && !detail.includes(String(p?.file ?? '\u0000')) ? `${detail} (${where})` : detail,
      p,
    );
  }
  return data as T;
}

/** An upload with an Idempotency-Key: a retry with the same key answers the first result. */
export async function apiUpload<T>(
  url: string,
  body: FormData,
  idempotencyKey: string,
): Promise<T> {
  return api<T>('POST', url, body, { 'idempotency-key': idempotencyKey });
}

// Shapes as the service sends them (server/http/schemas.ts)
export type Role = 'technician' | 'engineer' | 'auditor' | 'admin';
export interface User {
  id: number;
  name: string;
  role: Role;
  /** The sites this person may see and act on; null = every site. */
  sites: string[] | null;
  /** The units this person reads results in (PUT /api/session/preferences); JSON stays SI. */
  displayUnits?: UnitSystem;
}
import type { UnitSystem } from '../../server/core/format/unit-system.js';
export type { Outlet, Vessel } from '../../server/core/stored-vessel.js';
export interface DrainTest {
  id: number;
  vesselId: number;
  outletId: number | null;
  status: 'pending' | 'analysed';
  fileName: string;
  size: number;
  /** SHA-256 of the stored raw bytes (hex). */
  sha256: string;
  baro: { fileName: string } | null;
  settings: Settings;
  detected: Record<string, unknown> | null;
  operator: string | null;
  loggerId?: string | null;
  testedAt: string | null;
  testedAtSource?: 'stated' | 'log' | null;
  notes: string | null;
  createdAt: string;
  failedAttempts?: number;
  lastFailure?: string | null;
  stuck?: boolean;
}
export interface Fit {
  id: number;
  testId: number;
  vesselId: number;
  outletId: number | null;
  settings: Settings;
  vessel: Record<string, unknown>;
  result: FitResult;
  engineVersion: string;
  status: 'draft' | 'approved' | 'rejected';
  supersededBy: number | null;
  /** selfReview: approved by the uploader or refit requester where an admin allowed it (marked). */
  review: {
    comment: string | null;
    by: number | null;
    at: string | null;
    selfReview?: boolean;
  } | null;
  createdAt: string;
}
/** GET /api/fits/:id/people: the names behind a fit (null: the system, or not reviewed yet). */
export interface FitPeople {
  operator: string | null;
  uploadedBy: string | null;
  fittedBy: string | null;
  reviewedBy: string | null;
}
export interface Page<T> {
  items: T[];
  total: number;
}
export interface Settings {
  timeColumn?: string;
  levelColumn?: string;
  unit?: string;
  quantity?: string;
  dateOrder?: string;
  tz?: string;
  delimiter?: string;
  decimal?: string;
  levelTag?: string;
  baroTag?: string;
  sheet?: string;
  window?: string;
  fitInflow?: boolean;
  fitDatum?: boolean;
  fitExponent?: boolean;
}
// The fit result: the one shape (server/core/fit-result/schema.ts), type-only
export type {
  SingleFitResult as FitResult,
  FitParameter,
} from '../../server/core/fit-result/schema.js';
import type { SingleFitResult as FitResult } from '../../server/core/fit-result/schema.js';
import type { SideBySide } from '../../server/core/compare/side-by-side.js';
export type Estimate = FitResult['effectiveAreaM2'];
/** GET /api/outlets/:id/compare (server/core/compare/side-by-side.ts, type-only). */
export type TestComparison = SideBySide & {
  outlet: { id: number; key: string; vesselId: number };
};
export type Note = FitResult['warnings'][number];
export interface Series {
  t0: string | null;
  timeS: number[];
  levelM: number[];
  keep: number[];
}
export interface Inspection {
  head: { encoding: string; lines: string[] };
  detected: Record<string, unknown>;
  series: Series;
}
export interface MaintenanceEvent {
  id: number;
  outletId: number | null;
  kind: string;
  occurredAt: string;
  notes: string | null;
}

export const canUpload = (u: User) =>
  u.role === 'technician' || u.role === 'engineer' || u.role === 'admin';
export const canReview = (u: User) => u.role === 'engineer' || u.role === 'admin';
export const seesMaintenance = (u: User) => u.role !== 'technician';

/** The trend answers (server/jobs/trend-views.ts, type-only). */
export type {
  FleetItem as FleetStatusItem,
  TrendView as OutletTrend,
} from '../../server/jobs/trend-views.js';

/** GET that answers null when the route is absent (404 from the router, not from a missing record). */
export async function optional<T>(url: string): Promise<T | null> {
  try {
    return await api<T>('GET', url);
  } catch (e) {
    if (e instanceof ApiError && (e.status === 404 || e.status === 403)) return null;
    throw e;
  }
}
