/**
 * What a report is built from: the stored records, as plain data. The shells read them from the
 * store (server/render/report-records.ts); the core never sees the database.
 */
import type { FitJson } from '../analysis-contract.js';
import type { Outlet } from '../stored-vessel.js';

export interface RawFileRecord {
  fileName: string;
  size: number;
  sha256: string;
}

export interface VesselRecord {
  id: number;
  site: string;
  name: string;
  revision: number;
  /** The vessel file as stored. */
  spec: Record<string, unknown>;
}

/** The outlet (core/stored-vessel.ts) without its part of the vessel file. */
export type OutletRecord = Omit<Outlet, 'spec'>;

export interface TestRecord {
  id: number;
  testedAt: string | null;
  operator: string | null;
  loggerId: string | null;
  notes: string | null;
  uploadedAt: string;
  uploadedBy: string | null;
  log: RawFileRecord;
  baro: RawFileRecord | null;
  /** What the reader and the window chooser found (stored with the test's first analysis). */
  detected: Record<string, unknown> | null;
}

export interface ReviewRecord {
  decision: 'approved' | 'rejected';
  by: string | null;
  at: string;
  comment: string | null;
  /** Present (true) only for an approval by the uploader or refit requester, where the site allows it. */
  selfReview?: true;
}

export interface FitRecord {
  id: number;
  status: 'draft' | 'approved' | 'rejected';
  createdAt: string;
  createdBy: string | null;
  engineVersion: string;
  settings: Record<string, unknown>;
  /** The vessel file the analysis was given (narrowed to the tested outlet). */
  vesselGiven: Record<string, unknown>;
  result: FitJson;
  review: ReviewRecord | null;
  supersededBy: number | null;
}

/** Another fit of the same test (earlier or later), for the history table. */
export interface FitHistoryRecord {
  id: number;
  status: 'draft' | 'approved' | 'rejected';
  createdAt: string;
  createdBy: string | null;
  supersededBy: number | null;
  dischargeCoefficient: number | null;
  effectiveAreaM2: number | null;
  settings: Record<string, unknown>;
}

/** An audit-log entry about the fit or its test, with its place in the hash chain. */
export interface AuditRecord {
  seq: number;
  at: string;
  actor: string;
  action: string;
  entityType: string;
  entityId: string | null;
  hash: string;
}

export interface FitReportRecords {
  vessel: VesselRecord;
  outlet: OutletRecord | null;
  test: TestRecord;
  fit: FitRecord;
  history: FitHistoryRecord[];
  audit: AuditRecord[];
}

/** Which program wrote the report; passed in by the shell (the core knows no git). */
export interface SoftwareRecord {
  name: string;
  version: string;
  gitCommit: string;
}

export interface MaintenanceRecord {
  id: number;
  kind: 'cleaned' | 'replaced' | 'modified';
  occurredAt: string;
  notes: string | null;
  outletId: number | null;
}

/** One approved fit of the outlet, with what the history table and the trend need. */
export interface ApprovedFitRecord {
  fitId: number;
  testId: number;
  testedAt: string;
  log: RawFileRecord;
  result: FitJson;
  review: ReviewRecord;
}

export interface OutletReportRecords {
  vessel: VesselRecord;
  outlet: OutletRecord;
  fits: ApprovedFitRecord[];
  events: MaintenanceRecord[];
}
