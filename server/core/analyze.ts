/** The shells' entry to the computation (see analysis-contract.ts). */
export { analyzeDrainTest, prepareDrainTest, windowSamples, detectedSummary } from './analysis/analyze.js';
export type { AnalyzeHooks, PreparedTest } from './analysis/analyze.js';
