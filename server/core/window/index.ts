/** Cleaning a level log and finding the drain window. */
export { findSpikes } from './spikes.js';
export { findFlatLines, findClipping } from './runs.js';
export { findDrainCandidates, candidateScales } from './candidates.js';
export type { CandidateScales } from './candidates.js';
export { chooseDrainWindow } from './choose.js';
export { estimateResolution, estimateNoise } from './robust.js';
export type * from './types.js';
