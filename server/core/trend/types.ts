/** Inputs and outputs of trending an outlet's coefficient over months. */

/** One approved drain-test fit of an outlet (standard uncertainties, SI units). */
export interface ApprovedFit {
  fitId: string;
  /** When the drain test was run, epoch milliseconds. */
  testedAtMs: number;
  effectiveAreaM2: number;
  effectiveAreaU: number;
  dischargeCoefficient: number;
  dischargeCoefficientU: number;
}

export type MaintenanceKind = 'cleaned' | 'replaced' | 'modified';

export interface MaintenanceEvent {
  atMs: number;
  kind: MaintenanceKind;
  note?: string;
}

export interface TrendSettings {
  /**
   * Act when Cd·a has moved this many percent from the epoch baseline: negative for fouling
   * (e.g. -10 = lost 10 %), positive for erosion. Never zero.
   */
  actionThresholdPct: number;
  /** A forecast crossing within this many days is "action due soon" (default 180). */
  soonDays?: number;
}

/** The fits between two maintenance events; the first fit is the baseline. */
export interface Epoch {
  index: number;
  /** The event that opened the epoch (null for the first one, before any recorded maintenance). */
  startedBy: MaintenanceEvent | null;
  /** The event's time, or the first fit's time for the first epoch (NaN if it has no fits). */
  startMs: number;
  /** Fits in time order. */
  fits: ApprovedFit[];
  baseline: ApprovedFit | null;
}
