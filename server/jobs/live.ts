/**
 * Live drain tests: a test opened before the valve opens and fed rows while it runs. The bytes are
 * kept exactly as received (in memory, in order); every few seconds the whole log so far is
 * analysed in the worker pool (the same analyzeDrainTest an upload gets), and closing hands the
 * bytes to the ordinary upload (uploadDrainTest), so a live test is stored exactly as a file
 * uploaded whole: same SHA-256, audit entries and review.
 *
 * Acknowledgement: each append carries the byte offset the sender starts from; the answer is the
 * count of bytes held. A sender that lost its connection asks for that count and sends from
 * there; a resend that overlaps bytes already held is checked byte for byte and only its new part
 * kept, so nothing is lost or duplicated. Each piece is committed to the store (migration 005)
 * before it is acknowledged, and open live tests are taken up again when the service starts, so a
 * restart loses nothing either (the page and the sender reconnect; the refits start again).
 */
import { randomUUID } from 'node:crypto';
import type { AnalysisSettings, FitJson } from '../core/analysis-contract.js';
import { readTestSeries } from '../core/analysis/analyze.js';
import { InputError, isInputError } from '../core/errors.js';
import type { TargetQuantity } from '../core/plan/schema.js';
import type { Actor, Store } from '../store/index.js';
import type { DrainTest } from '../store/tests.js';
import type { StoredFit } from '../store/fits.js';
import { chooseOutlet, uploadDrainTest, vesselForAnalysis } from './ingest.js';
import type { AnalyzeRunner } from './pool.js';

/** The "enough data" rule (choices where the issue is silent): the fit converged, the target is met, the valve's opening was found, and the window past the opening trim spans at least this long and this many readings. */
export const ENOUGH_WINDOW_S = 60;
export const ENOUGH_WINDOW_SAMPLES = 30;

export interface LiveTarget {
  quantity: TargetQuantity;
  relativeStandardUncertainty: number;
}

export interface LiveFit {
  at: string;
  /** Seconds since the live test was opened. */
  elapsedS: number;
  rows: number;
  status: 'fitted' | 'waiting';
  message: string;
  converged: boolean | null;
  openingS: number | null;
  window: { startS: number; endS: number; samples: number } | null;
  cd: {
    value: number;
    standardUncertainty: number;
    expandedUncertainty: number;
    relativeStandardUncertainty: number;
  } | null;
  effectiveArea: {
    value: number;
    standardUncertainty: number;
    expandedUncertainty: number;
    relativeStandardUncertainty: number;
  } | null;
  /** u_r of the target's quantity. */
  targetRelative: number | null;
  enough: boolean;
  /** Thinned readings with the fitted curve, for drawing. */
  fittedCurve: { timeS: number[]; levelM: number[] } | null;
}

export interface LiveState {
  id: string;
  vesselId: number;
  outletId: number | null;
  fileName: string;
  openedAt: string;
  openedBy: string;
  target: LiveTarget;
  receivedBytes: number;
  rows: number;
  status: 'open' | 'closed' | 'abandoned';
  testId: number | null;
  fitId: number | null;
  latest: LiveFit | null;
  /** After each refit: the target's quantity (Cd or Cd·a) with its expanded uncertainty U and u_r. */
  history: {
    elapsedS: number;
    rows: number;
    value: number | null;
    expandedUncertainty: number | null;
    relative: number | null;
  }[];
  enoughSince: string | null;
}

export interface LiveOpen {
  vesselId: number;
  outletId?: number | null;
  fileName: string;
  settings?: AnalysisSettings;
  target: LiveTarget;
  operator?: string | null;
  loggerId?: string | null;
  notes?: string | null;
}

export type LiveEvent =
  | {
      type: 'rows';
      receivedBytes: number;
      rows: number;
      readings: { fromIndex: number; timeS: number[]; levelM: number[] } | null;
    }
  | { type: 'fit'; fit: LiveFit }
  | { type: 'closed'; testId: number; fitId: number }
  | { type: 'abandoned' };

interface Session {
  state: LiveState;
  input: LiveOpen;
  actor: Actor;
  chunks: Buffer[];
  openedMs: number;
  listeners: Set<(e: LiveEvent) => void>;
  refitting: boolean;
  refitTimer: NodeJS.Timeout | null;
  lastRefitMs: number;
  fittedRows: number;
  readTimer: NodeJS.Timeout | null;
  lastReadMs: number;
  lastReadCostMs: number;
  sentReadings: number;
}

export interface LiveOptions {
  store: Store;
  analyze: AnalyzeRunner;
  /** Most bytes a live test may hold (the upload limit). */
  limitBytes: number;
  /** Least time between two refits. */
  refitMs?: number;
  /** Least time between two readings updates. */
  readMs?: number;
  now?: () => number;
}

export class LiveTests {
  private sessions = new Map<string, Session>();
  private readonly refitMs: number;
  private readonly readMs: number;
  private readonly now: () => number;

  private constructor(private readonly opts: LiveOptions) {
    this.refitMs = opts.refitMs ?? 3000;
    this.readMs = opts.readMs ?? 1000;
    this.now = opts.now ?? Date.now;
  }

  /** The live tests, with those still open in the store taken up again (the store is read first). */
  static async create(opts: LiveOptions): Promise<LiveTests> {
    const live = new LiveTests(opts);
    await live.resume();
    return live;
  }

  private async resume(): Promise<void> {
    const opts = this.opts;
    for (const row of await opts.store.live.listOpen()) {
      const req = row.request as Omit<LiveOpen, 'vesselId' | 'fileName'>;
      const bytes = await opts.store.live.bytes(row.id);
      const s = this.session_(
        row.id,
        row.openedBy,
        { ...req, vesselId: row.vesselId, outletId: row.outletId, fileName: row.fileName },
        row.openedAt,
      );
      if (bytes.length) s.chunks.push(bytes);
      s.state.receivedBytes = bytes.length;
      for (const b of bytes) if (b === 0x0a) s.state.rows++;
      if (bytes.length) this.scheduleRefit(s);
    }
  }

  private session_(id: string, actor: Actor, input: LiveOpen, openedAt: string): Session {
    const state: LiveState = {
      id,
      vesselId: input.vesselId,
      outletId: input.outletId ?? null,
      fileName: input.fileName,
      openedAt,
      openedBy: actor.name,
      target: input.target,
      receivedBytes: 0,
      rows: 0,
      status: 'open',
      testId: null,
      fitId: null,
      latest: null,
      history: [],
      enoughSince: null,
    };
    const s: Session = {
      state,
      input,
      actor,
      chunks: [],
      openedMs: this.now(),
      listeners: new Set(),
      refitting: false,
      refitTimer: null,
      lastRefitMs: 0,
      fittedRows: 0,
      readTimer: null,
      lastReadMs: 0,
      lastReadCostMs: 0,
      sentReadings: 0,
    };
    this.sessions.set(id, s);
    return s;
  }

  async open(actor: Actor, input: LiveOpen): Promise<LiveState> {
    const vessel = await this.opts.store.vessels.get(input.vesselId);
    const outlet = chooseOutlet(vessel, input.outletId);
    const id = randomUUID();
    const { vesselId: _v, fileName, outletId: _o, ...request } = input;
    const row = await this.opts.store.live.open({
      id,
      vesselId: vessel.id,
      outletId: outlet?.id ?? null,
      fileName,
      request: request as Record<string, unknown>,
      openedBy: actor,
    });
    return this.session_(
      id,
      actor,
      { ...input, vesselId: vessel.id, outletId: outlet?.id ?? null },
      row.openedAt,
    ).state;
  }

  async get(id: string): Promise<LiveState> {
    const s = this.sessions.get(id);
    if (s) return s.state;
    // ended before this process started: what the store remembers of it
    const row = await this.opts.store.live.get(id);
    if (!row) return this.session(id).state; // 404
    return {
      id,
      vesselId: row.vesselId,
      outletId: row.outletId,
      fileName: row.fileName,
      openedAt: row.openedAt,
      openedBy: row.openedBy.name,
      target: (row.request as { target: LiveTarget }).target,
      receivedBytes: row.receivedBytes,
      rows: 0,
      status: row.status,
      testId: row.testId,
      fitId: null,
      latest: null,
      history: [],
      enoughSince: null,
    };
  }

  private session(id: string): Session {
    const s = this.sessions.get(id);
    if (!s)
      throw new LiveProblem(
        404,
        'not-found',
        `no live test "${id}" (it may have ended with a service restart: open a new one and send the file from the start)`,
      );
    return s;
  }

  private bytes(s: Session): Buffer {
    if (s.chunks.length > 1) s.chunks = [Buffer.concat(s.chunks)];
    return s.chunks[0] ?? Buffer.alloc(0);
  }

  /**
   * Append rows sent from byte `offset` (omitted: at the end). Bytes already held are compared,
   * not added again; a gap (offset past what is held) is refused with the count held.
   */
  async append(id: string, offset: number | undefined, body: Buffer): Promise<LiveState> {
    const s = this.session(id);
    if (s.state.status !== 'open')
      throw new LiveProblem(409, 'live-closed', `live test ${id} is ${s.state.status}`);
    const held = s.state.receivedBytes;
    const from = offset ?? held;
    if (from > held)
      throw new LiveProblem(
        409,
        'live-gap',
        `the service holds ${held} bytes of this test; send from byte ${held}`,
        { receivedBytes: held },
      );
    const overlap = Math.min(held - from, body.length);
    if (
      overlap > 0 &&
      !this.bytes(s)
        .subarray(from, from + overlap)
        .equals(body.subarray(0, overlap))
    ) {
      throw new LiveProblem(
        409,
        'live-mismatch',
        `bytes ${from}–${from + overlap} differ from those already received: the file changed behind the sender`,
        { receivedBytes: held },
      );
    }
    const fresh = body.subarray(overlap);
    if (held + fresh.length > this.opts.limitBytes)
      throw new LiveProblem(
        413,
        'too-large',
        `a live test may hold at most ${this.opts.limitBytes} bytes`,
      );
    if (fresh.length > 0) {
      // committed before it is acknowledged
      s.state.receivedBytes = await this.opts.store.live.append(id, held, fresh);
      s.chunks.push(Buffer.from(fresh));
      for (const b of fresh) if (b === 0x0a) s.state.rows++;
      this.scheduleRead(s);
      this.scheduleRefit(s);
    }
    return s.state;
  }

  subscribe(id: string, listener: (e: LiveEvent) => void): () => void {
    const s = this.session(id);
    s.listeners.add(listener);
    s.sentReadings = 0; // a new page gets every reading again with the next update
    if (s.state.receivedBytes > 0) this.scheduleRead(s);
    return () => s.listeners.delete(listener);
  }

  /** The readings so far, for a page that has just connected. */
  async readings(id: string): Promise<{ timeS: number[]; levelM: number[] } | null> {
    const s = this.session(id);
    return this.readSeries(s);
  }

  private emit(s: Session, e: LiveEvent): void {
    for (const l of s.listeners) l(e);
  }

  private async readSeries(s: Session): Promise<{ timeS: number[]; levelM: number[] } | null> {
    if (s.state.receivedBytes === 0) return null;
    try {
      const vessel = await this.opts.store.vessels.get(s.state.vesselId);
      const outlet =
        s.state.outletId === null
          ? null
          : (vessel.outlets.find((o) => o.id === s.state.outletId) ?? null);
      const { series } = readTestSeries({
        vessel: vesselForAnalysis(vessel, outlet),
        log: { bytes: new Uint8Array(this.bytes(s)), fileName: s.state.fileName },
        settings: s.input.settings ?? {},
      });
      return { timeS: Array.from(series.timeS), levelM: Array.from(series.levelM) };
    } catch {
      return null; // a header alone, or a half-written first row: nothing to draw yet
    }
  }

  private scheduleRead(s: Session): void {
    if (s.readTimer || s.listeners.size === 0) return;
    // the read runs on the event loop: a long log is read less often (at most ~5 % of the time)
    const wait = Math.max(
      0,
      s.lastReadMs + Math.max(this.readMs, 20 * s.lastReadCostMs) - this.now(),
    );
    s.readTimer = setTimeout(() => void this.sendReadings(s), wait);
  }

  private async sendReadings(s: Session): Promise<void> {
    s.readTimer = null;
    const t0 = performance.now();
    const all = await this.readSeries(s);
    s.lastReadCostMs = performance.now() - t0;
    s.lastReadMs = this.now();
    const from = all ? Math.min(s.sentReadings, all.timeS.length) : 0;
    const readings = all
      ? { fromIndex: from, timeS: all.timeS.slice(from), levelM: all.levelM.slice(from) }
      : null;
    if (all) s.sentReadings = all.timeS.length;
    this.emit(s, {
      type: 'rows',
      receivedBytes: s.state.receivedBytes,
      rows: s.state.rows,
      readings,
    });
  }

  private scheduleRefit(s: Session): void {
    if (s.refitting || s.refitTimer || s.state.status !== 'open') return;
    const wait = Math.max(0, s.lastRefitMs + this.refitMs - this.now());
    s.refitTimer = setTimeout(() => {
      s.refitTimer = null;
      void this.refit(s);
    }, wait);
  }

  private async refit(s: Session): Promise<void> {
    if (s.state.status !== 'open' || s.state.rows === s.fittedRows) return;
    s.refitting = true;
    s.lastRefitMs = this.now();
    const rows = s.state.rows;
    const vessel = await this.opts.store.vessels.get(s.state.vesselId);
    const outlet =
      s.state.outletId === null
        ? null
        : (vessel.outlets.find((o) => o.id === s.state.outletId) ?? null);
    const elapsedS = (this.now() - s.openedMs) / 1000;
    let fit: LiveFit;
    try {
      // a copy: the pool moves the bytes it is given to its thread
      const outcome = await this.opts.analyze({
        vessel: vesselForAnalysis(vessel, outlet),
        log: { bytes: new Uint8Array(this.bytes(s)), fileName: s.state.fileName },
        settings: s.input.settings ?? {},
      });
      fit = summarise(outcome.fit, s.state.target, rows, elapsedS);
    } catch (e) {
      fit = waiting(
        isInputError(e)
          ? e.message
          : 'the fit could not be run just now; it is tried again with the next rows',
        rows,
        elapsedS,
      );
    } finally {
      s.refitting = false;
      s.fittedRows = rows;
    }
    if (s.state.status !== 'open') return;
    fit.at = new Date(this.now()).toISOString();
    s.state.latest = fit;
    const q = s.state.target.quantity === 'discharge-coefficient' ? fit.cd : fit.effectiveArea;
    s.state.history.push({
      elapsedS,
      rows,
      value: q?.value ?? null,
      expandedUncertainty: q?.expandedUncertainty ?? null,
      relative: q?.relativeStandardUncertainty ?? null,
    });
    if (fit.enough && !s.state.enoughSince) s.state.enoughSince = fit.at;
    this.emit(s, { type: 'fit', fit });
    if (s.state.rows !== s.fittedRows) this.scheduleRefit(s);
  }

  /** Store the received bytes as an ordinary upload; the live test ends. */
  /** `allowDuplicate`: store it even when an earlier test of the vessel has the same bytes (else 409, as for an upload). */
  async close(
    id: string,
    actor: Actor,
    opts: { allowDuplicate?: boolean } = {},
  ): Promise<{ test: DrainTest; fit: StoredFit }> {
    const s = this.session(id);
    if (s.state.status !== 'open')
      throw new LiveProblem(409, 'live-closed', `live test ${id} is ${s.state.status}`);
    if (s.state.receivedBytes === 0)
      throw new InputError('no rows have been received: nothing to store', { field: 'rows' });
    s.state.status = 'closed';
    this.stopTimers(s);
    try {
      const out = await uploadDrainTest(this.opts.store, this.opts.analyze, actor, {
        vesselId: s.state.vesselId,
        outletId: s.state.outletId,
        log: { bytes: new Uint8Array(this.bytes(s)), fileName: s.state.fileName },
        settings: s.input.settings ?? {},
        operator: s.input.operator ?? null,
        loggerId: s.input.loggerId ?? null,
        notes: s.input.notes ?? null,
        allowDuplicate: opts.allowDuplicate,
      });
      s.state.testId = out.test.id;
      s.state.fitId = out.fit.id;
      await this.opts.store.live.finish(id, 'closed', out.test.id);
      this.emit(s, { type: 'closed', testId: out.test.id, fitId: out.fit.id });
      return out;
    } catch (e) {
      s.state.status = 'open'; // refused or failed: the rows are still here, the person may go on or abandon
      throw e;
    }
  }

  async abandon(id: string): Promise<void> {
    const s = this.session(id);
    s.state.status = 'abandoned';
    await this.opts.store.live.finish(id, 'abandoned');
    this.stopTimers(s);
    this.emit(s, { type: 'abandoned' });
    this.sessions.delete(id);
  }

  private stopTimers(s: Session): void {
    if (s.refitTimer) clearTimeout(s.refitTimer);
    if (s.readTimer) clearTimeout(s.readTimer);
    s.refitTimer = s.readTimer = null;
  }

  closeAll(): void {
    for (const s of this.sessions.values()) this.stopTimers(s);
  }
}

export class LiveProblem extends Error {
  constructor(
    readonly status: number,
    readonly slug: string,
    message: string,
    readonly extra: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

function waiting(message: string, rows: number, elapsedS: number): LiveFit {
  return {
    at: '',
    elapsedS,
    rows,
    status: 'waiting',
    message,
    converged: null,
    openingS: null,
    window: null,
    cd: null,
    effectiveArea: null,
    targetRelative: null,
    enough: false,
    fittedCurve: null,
  };
}

type Quantity = {
  value: number;
  standardUncertainty: number;
  expandedUncertainty?: number;
  relativeStandardUncertainty?: number;
};

function quantity(q: Quantity | null): LiveFit['cd'] {
  if (!q) return null;
  return {
    value: q.value,
    standardUncertainty: q.standardUncertainty,
    expandedUncertainty: q.expandedUncertainty ?? 2 * q.standardUncertainty,
    relativeStandardUncertainty:
      q.relativeStandardUncertainty ?? q.standardUncertainty / Math.abs(q.value),
  };
}

/** The fit's answer cut down to what the live page shows, and the "enough data" verdict. */
export function summarise(
  fit: FitJson,
  target: LiveTarget,
  rows: number,
  elapsedS: number,
): LiveFit {
  const trims = (fit.window.trims ?? []) as { what: string; fromS: number; toS: number }[];
  const opening = trims.find((t) => t.what === 'valve-opening');
  const notes = (fit.window.notes ?? []) as { code: string; message: string }[];
  const openingFound =
    !!opening && notes.some((n) => n.code === 'valve-opened' && !/already falling/.test(n.message));
  const cd = quantity(fit.dischargeCoefficient as Quantity | null);
  const area = quantity(fit.effectiveAreaM2 as Quantity);
  const targetRelative =
    (target.quantity === 'discharge-coefficient' ? cd : area)?.relativeStandardUncertainty ?? null;
  const span = fit.window.endS - fit.window.startS;
  const longEnough = span >= ENOUGH_WINDOW_S && fit.window.samples >= ENOUGH_WINDOW_SAMPLES;
  const met = targetRelative !== null && targetRelative <= target.relativeStandardUncertainty;
  const enough = fit.converged && openingFound && longEnough && met;
  const why = !fit.converged
    ? 'the fit has not converged yet'
    : !openingFound
      ? 'the valve opening has not been seen yet'
      : !longEnough
        ? `the window past the opening is ${span.toFixed(0)} s (${fit.window.samples} readings); at least ${ENOUGH_WINDOW_S} s and ${ENOUGH_WINDOW_SAMPLES} readings are wanted`
        : !met
          ? `u_r ${pct(targetRelative)} is above the target ${pct(target.relativeStandardUncertainty)}`
          : `u_r ${pct(targetRelative)} meets the target ${pct(target.relativeStandardUncertainty)} over ${span.toFixed(0)} s past the opening`;
  const plot = (
    fit as unknown as {
      plot?: { window?: { offsetS: number; timeS: number[]; fittedM: number[] } };
    }
  ).plot?.window;
  return {
    at: '',
    elapsedS,
    rows,
    status: 'fitted',
    message: enough
      ? `Enough data: ${why}. The valve may be closed (follow the site's procedure).`
      : `Not enough yet: ${why}.`,
    converged: fit.converged,
    openingS: opening ? opening.fromS : null,
    window: { startS: fit.window.startS, endS: fit.window.endS, samples: fit.window.samples },
    cd,
    effectiveArea: area,
    targetRelative,
    enough,
    fittedCurve: plot
      ? { timeS: plot.timeS.map((t) => t + plot.offsetS), levelM: plot.fittedM }
      : null,
  };
}

function pct(x: number | null): string {
  return x === null ? '—' : `${Number((x * 100).toPrecision(3))} %`;
}
