/** Shapes shared by the drain-window detectors and the chooser. Times are seconds from the log's start. */

/** A run of consecutive samples (indices inclusive) that a detector set aside. */
export interface SampleRun {
  startIndex: number;
  endIndex: number;
  startS: number;
  endS: number;
  samples: number;
  /** The reading the run sits at, in m. */
  levelM: number;
  /** Plain-words account of why the run was flagged. */
  reason: string;
}

export interface ClippingRun extends SampleRun {
  /** Pinned at the top ('max') or the bottom ('min') of the readings. */
  side: 'max' | 'min';
}

/** A stretch where the level falls by much more than the noise, bounded by holds or rises. */
export interface DrainCandidate {
  startIndex: number;
  endIndex: number;
  startS: number;
  endS: number;
  startLevelM: number;
  endLevelM: number;
  /** Fall in level from start to end, m (positive). */
  dropM: number;
  durationS: number;
}

export interface SpikeOptions {
  /** Samples either side of the centre in the moving window (default 5, i.e. 11 samples). */
  halfWindow?: number;
  /** Flag when |reading − moving median| exceeds this many scaled MADs (default 3.5). */
  threshold?: number;
  /**
   * Smallest scale accepted for the scaled MAD, m. Default: the larger of the reading resolution
   * and the series' white-noise level, so that quantised stretches (MAD = 0) flag nothing.
   */
  scaleFloorM?: number;
}

export interface FlatLineOptions {
  /** Shortest run of identical readings considered (default 10). */
  minSamples?: number;
  /** Flag when the level should have moved by more than this many reading steps or noise σ (default 5). */
  factor?: number;
  resolutionM?: number;
  excluded?: Uint8Array | null;
  /** estimateNoise(levelM, excluded), when the caller has measured it already. */
  noiseM?: number;
}

export interface ClippingOptions {
  /** Shortest run pinned at the extreme (default 5). */
  minSamples?: number;
  resolutionM?: number;
  /** [lowest, highest] reading, when the caller has found them already. */
  rangeM?: [number, number];
}

export interface CandidateOptions {
  /** A stretch at least this long with the level steady within the noise band is a hold (default 30 s). */
  holdS?: number;
  /** Smallest fall worth listing, m (default from the noise: see findDrainCandidates). */
  minDropM?: number;
  /** Samples per block of the decimated series (default: about 4000 blocks over the log). */
  blockSamples?: number;
}

export interface WindowOptions {
  /** The outlet's elevation as a level reading (where the head is zero), m, when known. */
  outletReadingM?: number;
  /** A window chosen by a person, seconds from the start; replaces the automatic choice. */
  window?: { startS: number; endS: number };
  /** Cut the end where the head falls below this fraction of the head at the window start (default 0.05). */
  headFraction?: number;
  /** Shortest valve-opening trim, s (default 5). */
  minOpeningTrimS?: number;
  /** Warn when the valve-opening trim takes more than this share of the drain (default 0.2). */
  warnOpeningTrimFraction?: number;
  /**
   * Refuse an automatic window when the valve-opening trim takes more than this share of the
   * drain (default 0.5): too little is left to trust; a person must choose the window.
   */
  refuseOpeningTrimFraction?: number;
  /** Plan area of the vessel at a level reading, m² (lets the still-opening rule use the head model). */
  areaAtReadingM2?: (readingM: number) => number;
  spikes?: SpikeOptions;
  candidates?: CandidateOptions;
  /** Shortest window accepted, samples (default 10). */
  minSamples?: number;
}

export interface WindowNote {
  code: string;
  message: string;
}

export interface WindowTrim {
  what: 'valve-opening' | 'nearly-empty' | 'flat-end';
  fromS: number;
  toS: number;
  reason: string;
}

export interface SpikeRecord {
  index: number;
  /** 1-based line of the source file. */
  line: number;
  timeS: number;
  levelM: number;
}

export interface DrainWindow {
  startIndex: number;
  endIndex: number;
  startS: number;
  endS: number;
  /** Samples between startIndex and endIndex inclusive (before exclusions). */
  samples: number;
}

export interface WindowChoice {
  window: DrainWindow;
  /** Length n: 1 for a sample inside the window and not set aside (spike, flat line, clipping). */
  keep: Uint8Array;
  candidates: DrainCandidate[];
  spikes: SpikeRecord[];
  flatLines: SampleRun[];
  clipping: ClippingRun[];
  trims: WindowTrim[];
  notes: WindowNote[];
  warnings: WindowNote[];
}
