/**
 * The second worker pool: heavy work a request asks for that is not a drain-test analysis — PDF
 * reports, a period export's PDFs and zip, reading a large log for the workbench (`inspect`,
 * `series`) and the joint fit of connected vessels. Why a pool of its own rather than the analysis
 * pool: the analysis pool has cores − 1 threads (one on 2 cores) and an upload's fit must not wait
 * behind an auditor's 60-PDF export; the two kinds of work have their own queues, time limits and
 * nice values. Each task has a time limit counted from the moment it is asked for (queue included):
 * past it the task is abandoned (its thread is replaced) and the caller gets TaskTimeoutError, which
 * the service answers 503. Tasks only compute: they read what they are given and return bytes or a
 * value, so an abandoned task leaves nothing half-written.
 */
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { TaskInput, TaskKind, TaskOutput } from './task-kinds.js';
import { reviveError, type SerialisedError } from './worker-reply.js';

export type { TaskKind } from './task-kinds.js';

export class TaskTimeoutError extends Error {
  constructor(
    readonly kind: TaskKind,
    readonly ms: number,
  ) {
    super(
      `the ${KIND_WORDS[kind]} did not finish within ${ms / 1000} s; try again later or ask for less`,
    );
    this.name = 'TaskTimeoutError';
  }
}

/** More tasks waiting than the queue holds: the service is busy with heavy work. */
export class TaskQueueFullError extends Error {
  constructor(readonly kind: TaskKind) {
    super(
      `the service is busy with other reports and reads; try the ${KIND_WORDS[kind]} again in a minute`,
    );
    this.name = 'TaskQueueFullError';
  }
}

const KIND_WORDS: Record<TaskKind, string> = {
  'fit-report-pdf': 'fit report',
  'outlet-report-pdf': 'outlet report',
  zip: 'export archive',
  inspect: 'look at the log',
  series: 'series of the stored log',
  'system-fit': 'joint fit of the connected vessels',
  'joint-fit-report-pdf': 'connected-vessel fit report',
};

/** Default time limits, ms (EFFLUX_TASK_TIMEOUT_S sets them all). */
export const DEFAULT_TASK_TIMEOUT_MS: Record<TaskKind, number> = {
  'fit-report-pdf': 60_000,
  'outlet-report-pdf': 60_000,
  zip: 60_000,
  inspect: 60_000,
  series: 60_000,
  'system-fit': 120_000,
  'joint-fit-report-pdf': 60_000,
};

export interface TaskRunOptions {
  /** Byte arrays given up to the worker (they read as empty afterwards). */
  transfer?: Uint8Array[];
  /** Abandon the task when this fires too (e.g. the export job was dropped). */
  signal?: AbortSignal;
}

export type TaskRunner = <K extends TaskKind>(
  kind: K,
  input: TaskInput<K>,
  opts?: TaskRunOptions,
) => Promise<TaskOutput<K>>;

export interface TaskPool {
  run: TaskRunner;
  close(): Promise<void>;
}

export interface TaskPoolOptions {
  /** Threads; default half the cores, at least one (the analysis pool has its own). */
  threads?: number;
  /** Per-kind limits, ms; a number sets every kind. */
  timeoutMs?: number | Partial<Record<TaskKind, number>>;
  /** Tasks waiting beyond the running ones before new ones are refused (503). */
  maxQueue?: number;
  /** Nice value of the task threads on Linux (higher yields more to the HTTP thread). */
  niceness?: number;
}

/** A view that owns its whole buffer can be transferred; a slice of a shared pool must not be. */
function ownsBuffer(b: Uint8Array): boolean {
  return (
    b.buffer instanceof ArrayBuffer &&
    b.byteOffset === 0 &&
    b.byteLength === b.buffer.byteLength &&
    b.byteLength > 0
  );
}

export function createTaskPool(opts: TaskPoolOptions = {}): TaskPool {
  const fromSource = import.meta.url.endsWith('.ts');
  const limits: Record<TaskKind, number> = { ...DEFAULT_TASK_TIMEOUT_MS };
  if (typeof opts.timeoutMs === 'number')
    for (const k of Object.keys(limits) as TaskKind[]) limits[k] = opts.timeoutMs;
  else Object.assign(limits, opts.timeoutMs ?? {});
  const pool = new Piscina({
    filename: new URL(`./task-worker${fromSource ? '.ts' : '.js'}`, import.meta.url).href,
    execArgv: fromSource ? ['--import', 'tsx'] : [],
    // no thread until the first task: most requests never need one
    minThreads: 0,
    maxThreads: opts.threads ?? Math.max(1, Math.floor(availableParallelism() / 2)),
    idleTimeout: 60_000,
    maxQueue: opts.maxQueue ?? 256,
    workerData: { niceness: opts.niceness ?? Number(process.env.EFFLUX_WORKER_NICE ?? 5) },
  });
  const run: TaskRunner = async (kind, input, o = {}) => {
    const limit = limits[kind];
    const timeout = AbortSignal.timeout(limit);
    const signal = o.signal ? AbortSignal.any([timeout, o.signal]) : timeout;
    const transferList = (o.transfer ?? []).filter(ownsBuffer).map((b) => b.buffer as ArrayBuffer);
    let reply: unknown;
    try {
      reply = await pool.run({ kind, input }, { signal, transferList });
    } catch (e) {
      const name = (e as Error)?.name;
      if ((name === 'AbortError' || name === 'TimeoutError') && timeout.aborted)
        throw new TaskTimeoutError(kind, limit);
      if (/queue is at limit|no task queue available/i.test((e as Error)?.message ?? ''))
        throw new TaskQueueFullError(kind);
      throw e;
    }
    if (reply instanceof Uint8Array) return reply as TaskOutput<typeof kind>;
    const r = reply as { error?: SerialisedError; value?: unknown };
    if (r.error) throw reviveError(r.error);
    return r.value as TaskOutput<typeof kind>;
  };
  return { run, close: () => pool.close() };
}
