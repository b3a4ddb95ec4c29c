/**
 * What `efflux inspect` prints about a read log: columns and units, time span, sample
 * interval, gaps, and everything the reader inferred or warned about. Plain data, no text
 * layout, so the CLI and the web page can show it their own way.
 */
import { findGaps, medianInterval } from './clean.js';
import type { DetectedColumn, LevelSeries, ReadNote } from './series.js';

export interface LogDescription {
  samples: number;
  columns: Pick<DetectedColumn, 'index' | 'header' | 'role' | 'unit' | 'reason'>[];
  /** ISO 8601 UTC instants of the first and last sample, or null for elapsed-time logs. */
  start: string | null;
  end: string | null;
  durationS: number;
  medianIntervalS: number;
  gaps: { afterLine: number; startS: number; endS: number; durationS: number }[];
  level: { minM: number; maxM: number; firstM: number; lastM: number };
  temperatureC: { min: number; max: number } | null;
  metadata: LevelSeries['metadata'];
  /** A long-format file's tags with their units and row counts; null for an ordinary file. */
  tags: NonNullable<LevelSeries['tags']> | null;
  notes: ReadNote[];
  warnings: ReadNote[];
}

function range(a: Float64Array): { min: number; max: number } {
  let min = Infinity,
    max = -Infinity;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < min) min = a[i];
    if (a[i] > max) max = a[i];
  }
  return { min, max };
}

export function describeLog(series: LevelSeries): LogDescription {
  const t = series.timeS,
    n = t.length;
  const median = n >= 2 ? medianInterval(t) : 0;
  const durationS = n ? t[n - 1] - t[0] : 0;
  const iso = (s: number) =>
    series.t0EpochMs === null ? null : new Date(series.t0EpochMs + s * 1000).toISOString();
  const lv = range(series.levelM);
  return {
    samples: n,
    columns: series.columns.map(({ index, header, role, unit, reason }) => ({
      index,
      header,
      role,
      unit,
      reason,
    })),
    start: n ? iso(t[0]) : null,
    end: n ? iso(t[n - 1]) : null,
    durationS,
    medianIntervalS: median,
    gaps:
      n >= 2
        ? findGaps(t, median).map((g) => ({
            afterLine: series.sourceLine[g.after],
            startS: g.startS,
            endS: g.endS,
            durationS: g.endS - g.startS,
          }))
        : [],
    level: { minM: lv.min, maxM: lv.max, firstM: series.levelM[0], lastM: series.levelM[n - 1] },
    temperatureC: series.temperatureC ? range(series.temperatureC) : null,
    metadata: series.metadata,
    tags: series.tags ?? null,
    notes: series.notes,
    warnings: series.warnings,
  };
}
