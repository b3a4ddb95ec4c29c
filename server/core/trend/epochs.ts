import { InputError } from '../errors.js';
import type { ApprovedFit, Epoch, MaintenanceEvent } from './types.js';

const KINDS = new Set(['cleaned', 'replaced', 'modified']);

function checkFit(f: ApprovedFit, i: number): void {
  // One bad field names itself; the common path is a handful of comparisons, no allocation.
  let bad: string | null = null;
  if (typeof f.fitId !== 'string' || f.fitId === '') bad = 'fitId';
  else if (!Number.isFinite(f.testedAtMs)) bad = 'testedAtMs';
  else if (!(f.effectiveAreaM2 > 0 && f.effectiveAreaM2 < Infinity)) bad = 'effectiveAreaM2';
  else if (!(f.effectiveAreaU > 0 && f.effectiveAreaU < Infinity)) bad = 'effectiveAreaU';
  else if (!(f.dischargeCoefficient > 0 && f.dischargeCoefficient < Infinity))
    bad = 'dischargeCoefficient';
  else if (!(f.dischargeCoefficientU > 0 && f.dischargeCoefficientU < Infinity))
    bad = 'dischargeCoefficientU';
  if (bad !== null) {
    const what =
      bad === 'fitId'
        ? 'fit has no id'
        : bad === 'testedAtMs'
          ? 'test time is not a number'
          : `${bad} must be a positive finite number`;
    throw new InputError(what, { field: `fits[${i}].${bad}` });
  }
}

function sortedBy<T>(xs: readonly T[], key: (x: T) => number): T[] {
  for (let i = 1; i < xs.length; i++)
    if (key(xs[i]) < key(xs[i - 1])) return [...xs].sort((a, b) => key(a) - key(b));
  return xs as T[]; // already in order (the usual case from the store): no copy; never mutated below
}

/**
 * Cut an outlet's history at each maintenance event: cleaning, replacement or modification resets
 * the bore, so the fouling line must restart there. A fit at the very instant of an event counts
 * as after it (the test that confirms the work). Epochs without fits are kept, so "cleaned, not
 * yet tested" shows.
 */
export function splitEpochs(
  fits: readonly ApprovedFit[],
  events: readonly MaintenanceEvent[],
): Epoch[] {
  for (let i = 0; i < fits.length; i++) checkFit(fits[i], i);
  events.forEach((e, i) => {
    if (!Number.isFinite(e.atMs))
      throw new InputError('event time is not a number', { field: `events[${i}].atMs` });
    if (!KINDS.has(e.kind))
      throw new InputError(`unknown maintenance kind "${String(e.kind)}"`, {
        field: `events[${i}].kind`,
      });
  });
  const sortedFits = sortedBy(fits, (f) => f.testedAtMs);
  const sortedEvents = sortedBy(events, (e) => e.atMs);

  const epochs: Epoch[] = [{ index: 0, startedBy: null, startMs: NaN, fits: [], baseline: null }];
  let e = 0;
  for (const f of sortedFits) {
    while (e < sortedEvents.length && sortedEvents[e].atMs <= f.testedAtMs) {
      const ev = sortedEvents[e++];
      epochs.push({
        index: epochs.length,
        startedBy: ev,
        startMs: ev.atMs,
        fits: [],
        baseline: null,
      });
    }
    epochs[epochs.length - 1].fits.push(f);
  }
  while (e < sortedEvents.length) {
    const ev = sortedEvents[e++];
    epochs.push({
      index: epochs.length,
      startedBy: ev,
      startMs: ev.atMs,
      fits: [],
      baseline: null,
    });
  }
  // An event recorded before any test leaves the first (pre-maintenance) epoch empty: drop it.
  if (epochs.length > 1 && epochs[0].fits.length === 0) {
    epochs.shift();
    epochs.forEach((ep, i) => (ep.index = i));
  }
  for (const ep of epochs) {
    ep.baseline = ep.fits[0] ?? null;
    if (ep.startedBy === null) ep.startMs = ep.baseline ? ep.baseline.testedAtMs : NaN;
  }
  return epochs;
}
