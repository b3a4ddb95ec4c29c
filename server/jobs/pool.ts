import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { AnalysisOutcome, AnalysisRequest } from '../core/analysis-contract.js';
import { warmUpRequest } from './warm-up.js';
import { reviveError, type WorkerReply } from './worker-reply.js';

/** Where an analysis spent its time, filled in by runners that know (the pool does). */
export interface RunTiming {
  /** analyzeDrainTest itself, inside the worker. */
  engineMs?: number;
  /** The whole round trip: queue, hand-over to the thread, the engine, the reply. */
  poolMs?: number;
}

/**
 * How the shells run an analysis: asynchronously, so the event loop stays free. Byte arrays of
 * the request that fill their own ArrayBuffer are moved to the worker, not copied: the caller
 * gives them up (they read as empty afterwards).
 */
export type AnalyzeRunner = (req: AnalysisRequest, timing?: RunTiming) => Promise<AnalysisOutcome>;

export interface AnalysisPool {
  run: AnalyzeRunner;
  /** Settles when the warm-up analysis has run (or was skipped, or failed: it never rejects). */
  warm: Promise<{ ms: number; ok: boolean } | null>;
  close(): Promise<void>;
}

export interface PoolOptions {
  /** Threads; default one fewer than the cores (at least one), leaving a core for HTTP and SQLite. */
  threads?: number;
  /** An analysis running longer is abandoned (its thread is replaced). */
  timeoutMs?: number;
  /** Module URL exporting analyzeDrainTest; default server/core/analyze.js. */
  analyzeModule?: string;
  /** Run a small built-in drain once at start (warm-up.ts); default on for the real engine. */
  warmUp?: boolean;
  /** Nice value of the analysis threads on Linux (0–19; higher yields more to the HTTP thread). */
  niceness?: number;
}

/** A view that owns its whole buffer can be transferred; a slice of a shared pool must not be. */
function ownsBuffer(b: Uint8Array | undefined): b is Uint8Array {
  return (
    !!b &&
    b.buffer instanceof ArrayBuffer &&
    b.byteOffset === 0 &&
    b.byteLength === b.buffer.byteLength &&
    b.byteLength > 0
  );
}

export class AnalysisTimeoutError extends Error {
  constructor(ms: number) {
    super(`the analysis did not finish within ${ms / 1000} s`);
    this.name = 'AnalysisTimeoutError';
  }
}

export function createAnalysisPool(opts: PoolOptions = {}): AnalysisPool {
  const fromSource = import.meta.url.endsWith('.ts');
  const threads = opts.threads ?? Math.max(1, availableParallelism() - 1);
  const timeoutMs = opts.timeoutMs ?? 120_000;
  const pool = new Piscina({
    filename: new URL(`./analysis-worker${fromSource ? '.ts' : '.js'}`, import.meta.url).href,
    // Running from TypeScript sources (tests, `node --import tsx`): the worker needs the loader too.
    execArgv: fromSource ? ['--import', 'tsx'] : [],
    minThreads: 1,
    maxThreads: threads,
    idleTimeout: 60_000,
    workerData: {
      analyzeModule: opts.analyzeModule,
      niceness: opts.niceness ?? Number(process.env.EFFLUX_WORKER_NICE ?? 5),
    },
  });
  const run: AnalyzeRunner = async (req, timing) => {
    const t0 = performance.now();
    const transferList = [req.log.bytes, req.baro?.bytes]
      .filter(ownsBuffer)
      .map((b) => b.buffer as ArrayBuffer);
    let reply: WorkerReply;
    try {
      reply = (await pool.run(req, {
        signal: AbortSignal.timeout(timeoutMs),
        transferList,
      })) as WorkerReply;
    } catch (e) {
      if ((e as Error)?.name === 'AbortError' || (e as Error)?.name === 'TimeoutError')
        throw new AnalysisTimeoutError(timeoutMs);
      throw e;
    }
    if (timing) {
      timing.poolMs = performance.now() - t0;
      timing.engineMs = reply.engineMs;
    }
    if (!reply.ok) throw reviveError(reply.error);
    return reply.outcome;
  };
  const started = performance.now();
  const warm =
    (opts.warmUp ?? opts.analyzeModule === undefined)
      ? run(warmUpRequest()).then(
          () => ({ ms: performance.now() - started, ok: true }),
          () => ({ ms: performance.now() - started, ok: false }),
        )
      : Promise.resolve(null);
  return { run, warm, close: () => pool.close() };
}
