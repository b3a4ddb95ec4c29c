/** What a person may tell the reader about a log when the file does not say it well enough. */
export type DateOrder = 'dmy' | 'mdy' | 'ymd';

/** What the measured column is; overrides what the header suggests. */
export type Quantity = 'level' | 'gauge-pressure' | 'absolute-pressure' | 'distance-from-top';

export interface ReadOptions {
  /** Column holding time: header text (case-insensitive) or 1-based index. */
  timeColumn?: string | number;
  /** Column holding the measured quantity: header text or 1-based index. */
  levelColumn?: string | number;
  /** Unit of the measured column when its header gives none, e.g. "cm", "kPa". */
  unit?: string;
  quantity?: Quantity;
  dateOrder?: DateOrder;
  /** IANA zone (e.g. "Europe/Madrid") for local timestamps written without an offset. */
  tz?: string;
  /** Where tz came from, said in the reader's note, e.g. "the site's zone" (default: stated by the person). */
  tzSource?: string;
  /** Field delimiter: one character, or "tab". */
  delimiter?: string;
  decimal?: '.' | ',';
  /** In a long-format file (time, tag, value rows): the tag of the level series. */
  levelTag?: string;
  /** In a long-format file: the tag of the barometric series, read from the same file. */
  baroTag?: string;
  /** Workbooks (.xlsx): the sheet to read, by name (default the first sheet). */
  sheet?: string;
  /** A barometric log (absolute pressure) to subtract from an absolute-pressure log. */
  baro?: { bytes: Uint8Array; fileName: string };
  fluidDensityKgM3?: number;
  /**
   * Density to use when the log has no temperature column and no fluidDensityKgM3 is given
   * (e.g. water at the temperature the vessel file states), with where it comes from.
   */
  fallbackDensity?: { valueKgM3: number; source: string };
  /** Elevation of a top-mounted distance sensor, in metres on the vessel's datum. */
  mountElevationM?: number;
  /** Elevation of the level zero on the same datum (default 0). */
  zeroElevationM?: number;
  gravityMS2?: number;
  /** Largest file accepted, bytes (default 64 MiB). */
  maxBytes?: number;
}

export const DEFAULT_MAX_BYTES = 64 * 1024 * 1024;

/** Rows with an unreadable cell that are skipped (with a warning) before the file is refused. */
export const MAX_BAD_ROW_FRACTION = 0.01;

/** Rows that repeat an earlier time with another value, as a share of all rows (and more than two), before the file is refused. */
export const CLASH_FRACTION = 0.03;

/** An interval longer than this many median intervals is reported as a gap. */
export const GAP_FACTOR = 5;
