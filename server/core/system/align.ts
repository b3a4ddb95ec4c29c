import { InputError } from '../errors.js';

/**
 * Put several vessels' logs from one test on one clock. Each log keeps its own sample times (no
 * interpolation onto a common grid: interpolating would smear and correlate the noise, and
 * the model can be evaluated at any time anyway). t = 0 is the latest first sample, the end is
 * the earliest last sample, and only samples inside that common span take part. Logs with
 * absolute timestamps are aligned by them; if every log has only elapsed time they are taken
 * to start together (said in a warning); a mix is refused.
 */
export interface LogForSystem {
  vessel: number;
  fileName: string;
  timeS: Float64Array;
  levelM: Float64Array;
  t0EpochMs: number | null;
}

export interface AlignedLog {
  vessel: number;
  fileName: string;
  timeS: Float64Array;
  levelM: Float64Array;
}

export interface Alignment {
  logs: AlignedLog[];
  /** Epoch ms of the common t = 0, or null for elapsed-time logs. */
  t0EpochMs: number | null;
  spanS: number;
  /** The common t = 0 in seconds on the logs' shared clock: after the earliest log's first timestamp, or on their elapsed time. */
  startS: number;
  warnings: string[];
}

/** window: seconds from the common start (optional end), to cut the fit to part of the span. */
export function alignLogs(
  logs: readonly LogForSystem[],
  window?: { startS: number; endS?: number },
): Alignment {
  if (logs.length === 0) throw new InputError('no logs given');
  const warnings: string[] = [];
  const absolute = logs.filter((l) => l.t0EpochMs !== null);
  if (absolute.length > 0 && absolute.length < logs.length) {
    const bare = logs.find((l) => l.t0EpochMs === null)!;
    throw new InputError(
      'has elapsed time only while other logs have timestamps, so it cannot be placed on their clock',
      { file: bare.fileName },
    );
  }
  const offsetMs = (l: LogForSystem) =>
    (l.t0EpochMs ?? 0) - (absolute.length ? Math.min(...absolute.map((a) => a.t0EpochMs!)) : 0);
  if (absolute.length === 0 && logs.length > 1)
    warnings.push('the logs have elapsed time only: they are taken to start at the same instant');
  let start = -Infinity;
  let end = Infinity;
  for (const l of logs) {
    if (l.timeS.length < 2)
      throw new InputError('has fewer than two samples', { file: l.fileName });
    const off = offsetMs(l) / 1000;
    start = Math.max(start, off + l.timeS[0]);
    end = Math.min(end, off + l.timeS[l.timeS.length - 1]);
  }
  if (!(end > start)) {
    const late = logs.reduce((a, b) =>
      offsetMs(a) / 1000 + a.timeS[0] > offsetMs(b) / 1000 + b.timeS[0] ? a : b,
    );
    throw new InputError(
      'does not overlap in time with the other logs: the vessels must be logged during the same test',
      { file: late.fileName },
    );
  }
  if (window) {
    const s = start + window.startS;
    const e = window.endS === undefined ? end : Math.min(end, start + window.endS);
    if (!(window.startS >= 0) || !(e > s))
      throw new InputError(
        `the window ${window.startS}..${window.endS ?? ''} s lies outside the logs' common span (0..${(end - start).toFixed(1)} s)`,
      );
    start = s;
    end = e;
  }
  const out: AlignedLog[] = logs.map((l) => {
    const off = offsetMs(l) / 1000;
    const keep: number[] = [];
    for (let i = 0; i < l.timeS.length; i++) {
      const t = off + l.timeS[i];
      if (t >= start - 1e-9 && t <= end + 1e-9) keep.push(i);
    }
    if (keep.length < 3)
      throw new InputError('has fewer than three samples inside the common span of the logs', {
        file: l.fileName,
      });
    return {
      vessel: l.vessel,
      fileName: l.fileName,
      timeS: Float64Array.from(keep, (i) => Math.max(off + l.timeS[i] - start, 0)),
      levelM: Float64Array.from(keep, (i) => l.levelM[i]),
    };
  });
  const base = absolute.length ? Math.min(...absolute.map((a) => a.t0EpochMs!)) : null;
  return {
    logs: out,
    t0EpochMs: base === null ? null : base + start * 1000,
    spanS: end - start,
    startS: start,
    warnings,
  };
}
