/**
 * The one call the shells make: raw logger bytes + vessel + settings → what was read and the fit.
 * Pure: the same inputs give the same output bit for bit (a stored fit can be recomputed).
 * Implemented by server/core/analyze.ts as `analyzeDrainTest(request): AnalysisOutcome`;
 * throws InputError (server/core/errors.ts) for any refused input.
 */

import type { SingleFitResult } from './fit-result/schema.js';

/** Settings a person can state; JSON-serialisable so they can be stored beside the fit. */
export interface AnalysisSettings {
  // reading
  timeColumn?: string;
  levelColumn?: string;
  unit?: string;
  quantity?: 'level' | 'gauge-pressure' | 'absolute-pressure' | 'distance-from-top';
  dateOrder?: 'dmy' | 'mdy' | 'ymd';
  tz?: string;
  /** 'site': tz was not stated but taken from the vessel's site (its time zone) at upload. */
  tzSource?: 'site';
  delimiter?: string;
  decimal?: '.' | ',';
  /** Long-format files (one row per time, tag and value): the level's tag, and the barometric tag if any. */
  levelTag?: string;
  baroTag?: string;
  /** Workbooks (.xlsx): the sheet to read (default the first). */
  sheet?: string;
  // window: "START..END" in seconds from the log's start or ISO timestamps
  window?: string;
  // model
  fitInflow?: boolean;
  fitDatum?: boolean;
  fitExponent?: boolean;
}

export interface RawFile {
  bytes: Uint8Array;
  fileName: string;
}

export interface AnalysisRequest {
  log: RawFile;
  baro?: RawFile;
  /** A vessel in the vessel-file format (validated again inside). */
  vesselFileName?: string;
  vessel: unknown;
  settings: AnalysisSettings;
}

export interface AnalysisOutcome {
  /** What the reader understood: columns, units, time span, interval, gaps, spikes, candidates. */
  detected: Record<string, unknown>;
  /** Exactly the object `efflux fit --json` prints. */
  fit: FitJson;
}

/** The JSON fit result (SI units, camelCase): the one shape, core/fit-result/schema.ts. */
export type FitJson = SingleFitResult;
