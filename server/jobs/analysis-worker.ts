/**
 * Piscina worker: runs one analysis off the main thread. Loads the engine lazily, once per thread,
 * from server/core/analyze.js (or the module named in workerData.analyzeModule: tests, benchmarks).
 */
import { setPriority } from 'node:os';
import { workerData } from 'node:worker_threads';
import type { AnalysisOutcome, AnalysisRequest } from '../core/analysis-contract.js';
import { EngineUnavailableError, serialiseError, type WorkerReply } from './worker-reply.js';

type Analyze = (req: AnalysisRequest) => AnalysisOutcome;
type Expand = (req: AnalysisRequest) => Promise<AnalysisRequest>;
let engine: Promise<(req: AnalysisRequest) => Promise<AnalysisOutcome>> | undefined;

// A fit may take a core for a while; below the HTTP thread's priority, reads keep answering
// quickly while it runs (Linux keeps a nice value per thread; elsewhere this may apply to the
// whole process or be refused, so it is skipped there).
const niceness = (workerData as { niceness?: number } | undefined)?.niceness ?? 0;
if (niceness > 0 && process.platform === 'linux') {
  try {
    setPriority(0, niceness);
  } catch {
    // not permitted: run at the normal priority
  }
}

function loadEngine(): Promise<(req: AnalysisRequest) => Promise<AnalysisOutcome>> {
  const configured = (workerData as { analyzeModule?: string } | undefined)?.analyzeModule;
  const ext = import.meta.url.endsWith('.ts') ? '.ts' : '.js';
  const url = configured ?? new URL(`../core/analyze${ext}`, import.meta.url).href;
  // From TypeScript sources (tests, `node --import tsx`), a worker's plain import() of another .ts
  // file is not routed through tsx; its API loads it explicitly.
  const load = url.endsWith('.ts')
    ? import('tsx/esm/api').then((api) => api.tsImport(url, import.meta.url))
    : import(url);
  return load.then(
    (m: { analyzeDrainTest?: Analyze; expandWorkbook?: Expand }) => {
      if (typeof m.analyzeDrainTest !== 'function')
        throw new EngineUnavailableError('the analysis engine exports no analyzeDrainTest');
      const analyze = m.analyzeDrainTest;
      // a workbook (.xlsx) is expanded to its sheet's text first (an engine without it reads text only)
      const expand = m.expandWorkbook;
      return expand
        ? async (req: AnalysisRequest) => analyze(await expand(req))
        : async (req: AnalysisRequest) => analyze(req);
    },
    (e: { code?: string }) => {
      if (e?.code === 'ERR_MODULE_NOT_FOUND')
        throw new EngineUnavailableError('the analysis engine is not built yet');
      throw e;
    },
  );
}

export default async function run(req: AnalysisRequest): Promise<WorkerReply> {
  try {
    engine ??= loadEngine();
    const analyze = await engine.catch((e) => {
      engine = undefined; // try again next time (the engine may be installed while we run)
      throw e;
    });
    const t0 = performance.now();
    const outcome = await analyze(req);
    return { ok: true, outcome, engineMs: performance.now() - t0 };
  } catch (e) {
    return { ok: false, error: serialiseError(e) };
  }
}
