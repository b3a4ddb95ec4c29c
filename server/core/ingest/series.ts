/**
 * What reading a logger file produces: a time series in SI units, plus an account of
 * what was inferred and why. Everything downstream (window, fit) works on this.
 */
export interface ReadNote {
  /** Short machine key, e.g. "delimiter", "time-format", "duplicates-dropped". */
  code: string;
  /** A plain sentence for a person. */
  message: string;
}

export type ColumnRole =
  | 'time'
  | 'date'
  | 'clock'
  | 'level'
  | 'gauge-pressure'
  | 'absolute-pressure'
  | 'distance-from-top'
  | 'temperature'
  | 'other';

export interface DetectedColumn {
  index: number;
  header: string;
  role: ColumnRole;
  /** Unit symbol as understood (e.g. "cm", "kPa", "degF"), or null when none was found. */
  unit: string | null;
  /** Why this role/unit was chosen. */
  reason: string;
}

export interface LevelSeries {
  /** Seconds since t0 (first kept sample is 0), ascending, no duplicates. */
  timeS: Float64Array;
  /** Liquid level in metres above the sensor zero (i.e. the reading, in SI). */
  levelM: Float64Array;
  /** Absolute instant of timeS = 0 as epoch milliseconds, or null for elapsed-time logs. */
  t0EpochMs: number | null;
  /** Optional temperature series (°C) aligned with timeS, when the log has one. */
  temperatureC?: Float64Array;
  /** 1-based source line number of each kept sample (for messages and cleaning lists). */
  sourceLine: Int32Array;
  /** Lines of metadata before the header, as key/value where they look like "key: value". */
  metadata: { line: number; text: string; key?: string; value?: string }[];
  columns: DetectedColumn[];
  /** For a long-format file (one row per time and tag): every tag with its unit and row count. */
  tags?: { tag: string; unit: string | null; rows: number }[];
  notes: ReadNote[];
  warnings: ReadNote[];
}
