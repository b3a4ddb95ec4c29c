import type { ExportJobs } from '../jobs/exports.js';
import type { AnalyzeRunner } from '../jobs/pool.js';
import type { TaskRunner } from '../jobs/tasks.js';
import type { Store } from '../store/index.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The repositories over the one SQLite connection. */
    store: Store;
    /** Runs an analysis off the event loop (the worker pool in production). */
    analyze: AnalyzeRunner;
    /** Runs reports, exports, large reads and joint fits off the event loop, with time limits (jobs/tasks.ts). */
    tasks: TaskRunner;
    /** Period exports in progress and done (jobs/exports.ts). */
    exports: ExportJobs;
  }
}
