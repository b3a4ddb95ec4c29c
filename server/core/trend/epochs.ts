import { InputError } from '../errors.js';
import type { ApprovedFit, Epoch, MaintenanceEvent } from './types.js';

const KINDS = new Set(['cleaned', 'replaced', 'modified']);

function checkFit(f: ApprovedFit, i: number): void {
  const at = (field: string) => ({ field: `fits[${i}].${field}` });
  if (typeof f.fitId !== 'string' || f.fitId === '') throw new InputError('fit has no id', at('fitId'));
  if (!Number.isFinite(f.testedAtMs)) throw new InputError('test time is not a number', at('testedAtMs'));
  if (!(f.effectiveAreaM2 > 0) || !Number.isFinite(f.effectiveAreaM2))
    throw new InputError('effective area must be a positive number', at('effectiveAreaM2'));
  if (!(f.effectiveAreaU > 0) || !Number.isFinite(f.effectiveAreaU))
    throw new InputError('uncertainty of the effective area must be positive', at('effectiveAreaU'));
  if (!(f.dischargeCoefficient > 0) || !Number.isFinite(f.dischargeCoefficient))
    throw new InputError('discharge coefficient must be a positive number', at('dischargeCoefficient'));
  if (!(f.dischargeCoefficientU > 0) || !Number.isFinite(f.dischargeCoefficientU))
    throw new InputError('uncertainty of the discharge coefficient must be positive', at('dischargeCoefficientU'));
}

/**
 * Cut an outlet's history at each maintenance event: cleaning, replacement or modification resets
 * the bore, so the fouling line must restart there. A fit at the very instant of an event counts
 * as after it (the test that confirms the work). Epochs without fits are kept, so "cleaned, not
 * yet tested" shows.
 */
export function splitEpochs(fits: readonly ApprovedFit[], events: readonly MaintenanceEvent[]): Epoch[] {
  fits.forEach(checkFit);
  events.forEach((e, i) => {
    if (!Number.isFinite(e.atMs)) throw new InputError('event time is not a number', { field: `events[${i}].atMs` });
    if (!KINDS.has(e.kind)) throw new InputError(`unknown maintenance kind "${String(e.kind)}"`, { field: `events[${i}].kind` });
  });
  const sortedFits = [...fits].sort((a, b) => a.testedAtMs - b.testedAtMs);
  const sortedEvents = [...events].sort((a, b) => a.atMs - b.atMs);

  const epochs: Epoch[] = [{ index: 0, startedBy: null, startMs: NaN, fits: [], baseline: null }];
  let e = 0;
  for (const f of sortedFits) {
    while (e < sortedEvents.length && sortedEvents[e].atMs <= f.testedAtMs) {
      const ev = sortedEvents[e++];
      epochs.push({ index: epochs.length, startedBy: ev, startMs: ev.atMs, fits: [], baseline: null });
    }
    epochs[epochs.length - 1].fits.push(f);
  }
  while (e < sortedEvents.length) {
    const ev = sortedEvents[e++];
    epochs.push({ index: epochs.length, startedBy: ev, startMs: ev.atMs, fits: [], baseline: null });
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
