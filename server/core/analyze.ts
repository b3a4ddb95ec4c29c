/** The shells' entry to the computation (see analysis-contract.ts). */
export {
  analyzeDrainTest,
  prepareDrainTest,
  windowSamples,
  detectedSummary,
  expandWorkbook,
} from './analysis/analyze.js';
export type { AnalyzeHooks, PreparedTest } from './analysis/analyze.js';
