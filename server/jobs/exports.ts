/**
 * Period exports as jobs: POST /api/exports starts one and answers 202 with its id; the job reads
 * the database on the HTTP thread one fit at a time (small reads) and has each PDF and the final zip
 * made in the task pool (tasks.ts), counting progress as the reports arrive; GET shows done/total,
 * and the zip is downloadable once the job is done. Jobs live in memory: a restart forgets them (an
 * export is made again from the records, byte for byte the same). Bounds: RUNNING_MAX jobs at once
 * (more is 503), finished jobs kept KEEP_MS and at most KEEP_MAX of them, oldest dropped first.
 * A job that fails or runs past its limit keeps no partial zip: only its message.
 */
import { randomUUID } from 'node:crypto';
import { InputError } from '../core/errors.js';
import type { SoftwareRecord } from '../core/report/index.js';
import { periodExport, selectFits, type ExportSelection } from '../render/period-export.js';
import type { Store } from '../store/index.js';
import { serialiseError } from './worker-reply.js';
import { TaskTimeoutError, type TaskRunner } from './tasks.js';

export const RUNNING_MAX = 2;
export const KEEP_MAX = 20;
export const KEEP_MS = 3600_000;
/** A whole export's limit, on top of each PDF's own (tasks.ts). */
export const EXPORT_TIMEOUT_MS = 30 * 60_000;

export type ExportState = 'running' | 'done' | 'failed';

export interface ExportJobView {
  id: string;
  state: ExportState;
  /** Reports made so far, of total. */
  done: number;
  total: number;
  selection: ExportSelection;
  createdAt: string;
  finishedAt: string | null;
  /** Zip size once done. */
  bytes: number | null;
  /** Why it failed (a plain sentence), once failed. */
  error: string | null;
}

interface Job extends ExportJobView {
  ownerId: number;
  zip: Uint8Array | null;
  finishedMs: number | null;
  abort: AbortController;
}

/** Too many exports running at once. */
export class ExportsBusyError extends Error {
  constructor() {
    super(`${RUNNING_MAX} exports are being made already; try again when one is done`);
    this.name = 'ExportsBusyError';
  }
}

export interface ExportJobsOptions {
  store: Store;
  tasks: TaskRunner;
  software: () => SoftwareRecord;
  now?: () => number;
  log?: (detail: object, line: string) => void;
}

export class ExportJobs {
  private readonly jobs = new Map<string, Job>();
  private readonly now: () => number;
  constructor(private readonly o: ExportJobsOptions) {
    this.now = o.now ?? Date.now;
  }

  /** Checks the selection (InputError → 422 at once), then starts the job. */
  async start(ownerId: number, selection: ExportSelection): Promise<ExportJobView> {
    this.prune();
    if ([...this.jobs.values()].filter((j) => j.state === 'running').length >= RUNNING_MAX)
      throw new ExportsBusyError();
    const chosen = await selectFits(this.o.store, selection);
    const total = chosen.length;
    if (total === 0) throw new InputError('no approved fits match the selection');
    const job: Job = {
      id: randomUUID(),
      state: 'running',
      done: 0,
      total,
      selection: { ...selection },
      createdAt: new Date(this.now()).toISOString(),
      finishedAt: null,
      bytes: null,
      error: null,
      ownerId,
      zip: null,
      finishedMs: null,
      abort: new AbortController(),
    };
    this.jobs.set(job.id, job);
    void this.run(job, chosen); // in the background: the caller gets 202 at once
    return view(job);
  }

  private async run(job: Job, chosen: Awaited<ReturnType<typeof selectFits>>): Promise<void> {
    const limit = AbortSignal.timeout(EXPORT_TIMEOUT_MS);
    const signal = AbortSignal.any([limit, job.abort.signal]);
    try {
      const r = await periodExport(this.o.store, job.selection, this.o.software(), {
        renderPdf: (report) => this.o.tasks('fit-report-pdf', { report, units: 'si' }, { signal }),
        assemble: (a) =>
          this.o.tasks('zip', a, { signal, transfer: a.entries.map((e) => e.bytes) }),
        onProgress: (done, total) => {
          job.done = done;
          job.total = total;
        },
        signal,
        chosen,
      });
      job.zip = r.zip;
      job.bytes = r.zip.byteLength;
      job.state = 'done';
    } catch (e) {
      job.state = 'failed';
      job.error = limit.aborted
        ? `the export did not finish within ${EXPORT_TIMEOUT_MS / 60_000} minutes`
        : e instanceof TaskTimeoutError || (e as Error)?.name === 'InputError'
          ? (e as Error).message
          : 'the export could not be made; the error was logged';
      if (!(e instanceof TaskTimeoutError) && (e as Error)?.name !== 'InputError')
        this.o.log?.({ err: serialiseError(e), job: job.id }, 'export failed');
    } finally {
      job.finishedMs = this.now();
      job.finishedAt = new Date(job.finishedMs).toISOString();
    }
  }

  /** The job, to its owner (or an admin); undefined otherwise, so ids of others' jobs are not revealed. */
  get(id: string, userId: number, isAdmin: boolean): ExportJobView | undefined {
    this.prune();
    const j = this.jobs.get(id);
    return j && (j.ownerId === userId || isAdmin) ? view(j) : undefined;
  }

  zip(id: string, userId: number, isAdmin: boolean): Uint8Array | null | undefined {
    const j = this.jobs.get(id);
    if (!j || !(j.ownerId === userId || isAdmin)) return undefined;
    return j.zip;
  }

  /** Stops every running job (the service is closing). */
  close(): void {
    for (const j of this.jobs.values())
      if (j.state === 'running') j.abort.abort(new Error('the service is stopping'));
  }

  private prune(): void {
    const now = this.now();
    const finished = [...this.jobs.values()]
      .filter((j) => j.finishedMs !== null)
      .sort((a, b) => a.finishedMs! - b.finishedMs!);
    for (const [i, j] of finished.entries()) {
      if (now - j.finishedMs! > KEEP_MS || finished.length - i > KEEP_MAX) this.jobs.delete(j.id);
    }
  }
}

function view(j: Job): ExportJobView {
  return {
    id: j.id,
    state: j.state,
    done: j.done,
    total: j.total,
    selection: j.selection,
    createdAt: j.createdAt,
    finishedAt: j.finishedAt,
    bytes: j.bytes,
    error: j.error,
  };
}
