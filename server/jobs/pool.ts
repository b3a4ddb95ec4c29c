import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { AnalysisOutcome, AnalysisRequest } from '../core/analysis-contract.js';
import { reviveError, type WorkerReply } from './worker-reply.js';

/** How the shells run an analysis: asynchronously, so the event loop stays free. */
export type AnalyzeRunner = (req: AnalysisRequest) => Promise<AnalysisOutcome>;

export interface AnalysisPool {
  run: AnalyzeRunner;
  close(): Promise<void>;
}

export interface PoolOptions {
  /** Threads; default one fewer than the cores (at least one), leaving a core for HTTP and SQLite. */
  threads?: number;
  /** An analysis running longer is abandoned (its thread is replaced). */
  timeoutMs?: number;
  /** Module URL exporting analyzeDrainTest; default server/core/analyze.js. */
  analyzeModule?: string;
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
    workerData: { analyzeModule: opts.analyzeModule },
  });
  return {
    async run(req) {
      let reply: WorkerReply;
      try {
        reply = (await pool.run(req, { signal: AbortSignal.timeout(timeoutMs) })) as WorkerReply;
      } catch (e) {
        if ((e as Error)?.name === 'AbortError' || (e as Error)?.name === 'TimeoutError') throw new AnalysisTimeoutError(timeoutMs);
        throw e;
      }
      if (!reply.ok) throw reviveError(reply.error);
      return reply.outcome;
    },
    close: () => pool.close(),
  };
}
