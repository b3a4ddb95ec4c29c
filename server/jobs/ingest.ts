import type { AnalysisSettings } from '../core/analysis-contract.js';
import { checkStatedTestDate, logTestDate, undatedTestError } from '../core/analysis/test-date.js';
import { InputError, isInputError } from '../core/errors.js';
import { ConflictError, isDiskFull } from '../store/errors.js';
import type { Actor, Store } from '../store/index.js';
import type { StoredFit } from '../store/fits.js';
import { sha256Hex, type DrainTest, type RawInput } from '../store/tests.js';
import type { Outlet, Vessel } from '../store/vessels.js';
import type { AnalyzeRunner, RunTiming } from './pool.js';

export interface UploadInput {
  vesselId: number;
  outletId?: number | null;
  log: RawInput;
  baro?: RawInput;
  settings: AnalysisSettings;
  operator?: string | null;
  loggerId?: string | null;
  testedAt?: string | null;
  notes?: string | null;
  /** Store it even when a test of this vessel has the same bytes (the audit entry says so). */
  allowDuplicate?: boolean;
  /** The client's Idempotency-Key: a retry with the same key answers the first result. */
  idempotencyKey?: string | null;
  /** "Now" for checking a stated date (tests inject it); default the clock. */
  nowMs?: number;
}

/** The outlet a test is for: the one named, else the vessel's only active outlet. */
export function chooseOutlet(vessel: Vessel, outletId: number | null | undefined): Outlet | null {
  const active = vessel.outlets.filter((o) => o.retiredAt === null);
  if (outletId !== undefined && outletId !== null) {
    const o = active.find((x) => x.id === outletId);
    if (!o)
      throw new InputError(`vessel ${vessel.id} has no active outlet ${outletId}`, {
        field: 'outletId',
      });
    return o;
  }
  if (active.length > 1) {
    throw new InputError(
      `vessel ${vessel.id} has ${active.length} outlets; say which one was tested`,
      { field: 'outletId' },
    );
  }
  return active[0] ?? null;
}

/**
 * The vessel file handed to the analysis: as stored, but narrowed to the one outlet tested and
 * without the service's own outlet fields, so the engine sees the single-outlet file it reads.
 */
export function vesselForAnalysis(vessel: Vessel, outlet: Outlet | null): Record<string, unknown> {
  const spec = { ...vessel.spec };
  const chosen = outlet ? outlet.spec : (spec.outlet as Record<string, unknown> | undefined);
  delete spec.outlets;
  if (chosen) {
    const { actionThreshold: _kept, ...plain } = chosen; // the service's own field, not the engine's
    spec.outlet = plain;
  }
  return spec;
}

/** Milliseconds per step of an upload (the service sends them as Server-Timing). */
export interface UploadTiming extends RunTiming {
  /** SHA-256 and the commit of the bytes and the test row. */
  storeRawMs?: number;
  /** Storing the fit and the test's new state, and reading both back. */
  storeFitMs?: number;
}

/**
 * An upload: the raw bytes are committed first (so a crash during the analysis loses nothing),
 * then the analysis runs in the pool, then its fit is stored as a draft. When the analysis refuses
 * the input, the test is withdrawn (row and unshared bytes deleted; the audit log records both)
 * and the InputError goes back to the caller. Any other failure leaves the test pending; it is
 * analysed again on the next start (resumePending). The analysis is given the bytes received
 * (moved to the worker once committed: `input`'s byte arrays are spent afterwards), not a copy
 * read back from the database.
 */
export async function uploadDrainTest(
  store: Store,
  analyze: AnalyzeRunner,
  actor: Actor,
  input: UploadInput,
  timing: UploadTiming = {},
): Promise<{ test: DrainTest; fit: StoredFit; replayed?: boolean }> {
  const vessel = await store.vessels.get(input.vesselId);
  if (input.idempotencyKey) {
    const prior = await store.tests.byIdempotencyKey(actor.id, input.idempotencyKey);
    if (prior) return replay(store, prior, input);
  }
  const outlet = chooseOutlet(vessel, input.outletId);
  const testedAt = input.testedAt
    ? checkStatedTestDate(input.testedAt, input.nowMs ?? Date.now())
    : null;
  const t0 = performance.now();
  const test = await store.tests.createPending(actor, {
    vesselId: vessel.id,
    outletId: outlet?.id ?? null,
    log: input.log,
    baro: input.baro,
    settings: input.settings as Record<string, unknown>,
    operator: input.operator,
    loggerId: input.loggerId,
    testedAt,
    notes: input.notes,
    allowDuplicate: input.allowDuplicate,
    idempotencyKey: input.idempotencyKey,
  });
  timing.storeRawMs = performance.now() - t0;
  let fit: StoredFit;
  try {
    fit = await analyseStored(
      store,
      analyze,
      actor,
      test,
      vessel,
      outlet,
      { log: input.log, baro: input.baro },
      timing,
      { compensateDiskFull: true },
    );
  } catch (e) {
    // the bytes are kept and the test waits: say which one, so the caller can retry or withdraw it
    if (!isInputError(e) && !isDiskFull(e) && e instanceof Error)
      e.message += ` (test ${test.id} is kept pending: retry or withdraw it)`;
    throw e;
  }
  const t1 = performance.now();
  store.reserve?.ensure(); // one stat; remakes the reserve once a full disk has room again
  const answer = { test: await store.tests.get(test.id), fit };
  timing.storeFitMs = (timing.storeFitMs ?? 0) + performance.now() - t1;
  return answer;
}

/** A retry with a key already used: the first upload's test and first fit, nothing stored. */
async function replay(
  store: Store,
  prior: { testId: number; sha256: string },
  input: UploadInput,
): Promise<{ test: DrainTest; fit: StoredFit; replayed: true }> {
  if (prior.sha256 !== sha256Hex(input.log.bytes)) {
    throw new InputError(
      `this Idempotency-Key was used for test ${prior.testId} with another log file; use a new key for a new upload`,
      { field: 'Idempotency-Key' },
    );
  }
  const test = await store.tests.get(prior.testId);
  const first = (await store.fits.listByTest(test.id))[0];
  if (!first)
    throw new ConflictError(
      `the upload with this Idempotency-Key (test ${test.id}) is still being analysed; retry shortly`,
    );
  return { test, fit: first, replayed: true };
}

async function analyseStored(
  store: Store,
  analyze: AnalyzeRunner,
  actor: Actor,
  test: DrainTest,
  vessel: Vessel,
  outlet: Outlet | null,
  received?: { log: RawInput; baro?: RawInput },
  timing: UploadTiming = {},
  opts: { compensateDiskFull?: boolean } = {},
): Promise<StoredFit> {
  const vesselSpec = vesselForAnalysis(vessel, outlet);
  const settings = test.settings as AnalysisSettings;
  const busy = analysing(store);
  if (busy.has(test.id)) throw new ConflictError(`test ${test.id} is being analysed already`);
  busy.add(test.id);
  try {
    const logBytes = received?.log.bytes ?? (await store.tests.rawBytes(test.sha256));
    const baroBytes = test.baro
      ? (received?.baro?.bytes ?? (await store.tests.rawBytes(test.baro.sha256)))
      : undefined;
    const outcome = await analyze(
      {
        log: { bytes: logBytes, fileName: test.fileName },
        baro: test.baro ? { bytes: baroBytes!, fileName: test.baro.fileName } : undefined,
        vessel: vesselSpec,
        settings,
      },
      timing,
    );
    // the test's one date: stated, else the first reading of the fitted window on the log's clock
    const logDate = logTestDate(outcome.fit.window, outcome.detected.metadata);
    if (test.testedAt === null && logDate === null) throw undatedTestError(test.fileName);
    const t0 = performance.now();
    const fit = await store.fits.storeFirst(
      actor,
      test.id,
      outcome.detected,
      {
        settings: settings as Record<string, unknown>,
        vessel: vesselSpec,
        result: outcome.fit as Record<string, unknown>,
      },
      logDate,
    );
    timing.storeFitMs = performance.now() - t0;
    return fit;
  } catch (e) {
    if (isInputError(e)) await store.tests.withdraw(actor, test.id, e.toLine());
    else if (isDiskFull(e) && opts.compensateDiskFull) await keepNothing(store, actor, test.id, e);
    else await noteFailure(store, test.id, e);
    throw e;
  } finally {
    busy.delete(test.id);
  }
}

/** Tests whose analysis runs now, per store: a retry never runs beside the upload's or the resume's. */
const inFlight = new WeakMap<Store, Set<number>>();
function analysing(store: Store): Set<number> {
  let s = inFlight.get(store);
  if (!s) inFlight.set(store, (s = new Set()));
  return s;
}

/**
 * The compensating step of an upload whose fit could not be stored for a full disk: the test and
 * its unshared bytes are withdrawn (deleting frees pages), so the answer 507 leaves no record the
 * client was not told of. If even that fails, the test stays pending and marked, for a retry.
 */
async function keepNothing(
  store: Store,
  actor: Actor,
  testId: number,
  cause: unknown,
): Promise<void> {
  const withdraw = async () =>
    await store.tests.withdraw(
      actor,
      testId,
      'not kept: the disk was full when its fit was stored',
    );
  try {
    if (store.reserve) await store.reserve.spend(withdraw);
    else await withdraw();
  } catch {
    await noteFailure(store, testId, cause);
  }
}

/** The service is stopping: an analysis cut short by that is not the test's failure. */
export class StoppingError extends Error {
  constructor() {
    super('the service is stopping');
    this.name = 'StoppingError';
  }
}

async function noteFailure(store: Store, testId: number, cause: unknown): Promise<void> {
  if (cause instanceof StoppingError) return;
  try {
    await store.tests.recordFailure(testId, cause instanceof Error ? cause.message : String(cause));
  } catch {
    // the disk may still be full: the test stays pending either way, and the resume tries again
  }
}

/** A new fit of a stored test with changed settings (merged over the old fit's); see FitRepo.refit for what it supersedes. */
export async function refit(
  store: Store,
  analyze: AnalyzeRunner,
  actor: Actor,
  fitId: number,
  changes: AnalysisSettings,
): Promise<StoredFit> {
  const old = await store.fits.get(fitId);
  const test = await store.tests.get(old.testId);
  const vessel = await store.vessels.get(test.vesselId);
  const outlet =
    test.outletId === null ? null : (vessel.outlets.find((o) => o.id === test.outletId) ?? null);
  const settings = { ...(old.settings as AnalysisSettings), ...changes };
  const vesselSpec = vesselForAnalysis(vessel, outlet);
  const outcome = await analyze({
    log: { bytes: await store.tests.rawBytes(test.sha256), fileName: test.fileName },
    baro: test.baro
      ? { bytes: await store.tests.rawBytes(test.baro.sha256), fileName: test.baro.fileName }
      : undefined,
    vessel: vesselSpec,
    settings,
  });
  return await store.fits.refit(actor, fitId, {
    settings: settings as Record<string, unknown>,
    vessel: vesselSpec,
    result: outcome.fit as Record<string, unknown>,
  });
}

export interface ResumeReport {
  done: number;
  refused: number;
  failed: { testId: number; reason: string }[];
  /** Left for a person: failed MAX_ANALYSIS_ATTEMPTS times already. */
  stuck: number;
}

/**
 * Analyses tests left pending by an earlier run (stopped between storing and fitting), one at a
 * time; a test that fails is noted (its failure count rises) and the next one goes on. Tests that
 * have failed MAX_ANALYSIS_ATTEMPTS times are skipped: a person retries or withdraws them.
 */
export async function resumePending(
  store: Store,
  analyze: AnalyzeRunner,
  actor: Actor,
): Promise<ResumeReport> {
  const report: ResumeReport = { done: 0, refused: 0, failed: [], stuck: 0 };
  for (const t of await store.tests.pending()) {
    if (t.stuck) {
      report.stuck++;
      continue;
    }
    if (analysing(store).has(t.id)) continue;
    try {
      const vessel = await store.vessels.get(t.vesselId);
      const outlet =
        t.outletId === null ? null : (vessel.outlets.find((o) => o.id === t.outletId) ?? null);
      await analyseStored(store, analyze, actor, await store.tests.get(t.id), vessel, outlet);
      report.done++;
    } catch (e) {
      if (e instanceof StoppingError) break;
      if (isInputError(e)) report.refused++;
      else report.failed.push({ testId: t.id, reason: e instanceof Error ? e.message : String(e) });
    }
  }
  return report;
}

/** A person asks for a pending test to be analysed again (after a timeout, a fault or a full disk). */
export async function retryPending(
  store: Store,
  analyze: AnalyzeRunner,
  actor: Actor,
  testId: number,
): Promise<StoredFit> {
  const t = await store.tests.get(testId);
  if (t.status !== 'pending')
    throw new ConflictError(`test ${testId} is analysed already; refit its fit instead`);
  if (analysing(store).has(testId))
    throw new ConflictError(`test ${testId} is being analysed already`);
  await store.tests.noteRetry(actor, testId);
  const vessel = await store.vessels.get(t.vesselId);
  const outlet =
    t.outletId === null ? null : (vessel.outlets.find((o) => o.id === t.outletId) ?? null);
  return analyseStored(store, analyze, actor, await store.tests.get(testId), vessel, outlet);
}

/** A person takes back a pending test (its bytes go unless another test shares them); the audit log keeps the reason. */
export async function withdrawPending(
  store: Store,
  actor: Actor,
  testId: number,
  reason: string,
): Promise<void> {
  const t = await store.tests.get(testId);
  if (t.status !== 'pending')
    throw new ConflictError(`test ${testId} is analysed: analysed tests stay in the history`);
  if (analysing(store).has(testId))
    throw new ConflictError(`test ${testId} is being analysed now; withdraw it when that ends`);
  await store.tests.withdraw(actor, testId, reason);
}
