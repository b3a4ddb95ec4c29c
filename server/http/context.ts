import type { AnalyzeRunner } from '../jobs/pool.js';
import type { Store } from '../store/index.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The repositories over the one SQLite connection. */
    store: Store;
    /** Runs an analysis off the event loop (the worker pool in production). */
    analyze: AnalyzeRunner;
  }
}
