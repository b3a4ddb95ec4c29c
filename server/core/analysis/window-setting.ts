import { InputError } from '../errors.js';
import { ZoneResolver } from '../ingest/zone.js';

/**
 * A window stated by a person: "START..END", each either seconds from the log's first sample or
 * an ISO 8601 timestamp (then the log must carry absolute time). A timestamp without an offset is
 * local time in `tz` when one is given (as the log's own local times are), else UTC.
 * Returns seconds from the start.
 */
export function parseWindowSetting(
  text: string,
  t0EpochMs: number | null,
  tz?: string,
): { startS: number; endS: number } {
  const parts = text.split('..');
  if (parts.length !== 2 || !parts[0].trim() || !parts[1].trim()) {
    throw new InputError(
      `window "${text}" is not START..END (seconds from the log's start, or ISO 8601 timestamps)`,
      { field: 'window' },
    );
  }
  const zone = tz ? new ZoneResolver(tz, 'window') : null;
  const [startS, endS] = parts.map((p) => toSeconds(p.trim(), t0EpochMs, text, zone));
  if (!(endS > startS))
    throw new InputError(`window "${text}" ends before it starts`, { field: 'window' });
  return { startS, endS };
}

function toSeconds(
  part: string,
  t0EpochMs: number | null,
  whole: string,
  zone: ZoneResolver | null,
): number {
  if (/^[+-]?\d+(\.\d+)?$/.test(part)) return Number(part);
  if (!/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(part)) {
    throw new InputError(
      `window "${whole}": "${part}" is neither seconds nor an ISO 8601 timestamp`,
      { field: 'window' },
    );
  }
  if (t0EpochMs === null) {
    throw new InputError(
      `window "${whole}" uses timestamps but the log has elapsed time only: give seconds`,
      { field: 'window' },
    );
  }
  const iso = part.replace(' ', 'T');
  const hasOffset = /([zZ]|[+-]\d{2}:?\d{2})$/.test(iso);
  let ms = Date.parse(hasOffset ? iso : `${iso}Z`);
  if (!Number.isFinite(ms))
    throw new InputError(`window "${whole}": "${part}" is not a valid timestamp`, {
      field: 'window',
    });
  if (!hasOffset && zone) {
    ms = zone.resolve(ms, -Infinity);
    if (!Number.isFinite(ms))
      throw new InputError(
        `window "${whole}": "${part}" falls in the hour skipped when ${zone.zone} changed its clocks`,
        { field: 'window' },
      );
  }
  return (ms - t0EpochMs) / 1000;
}
