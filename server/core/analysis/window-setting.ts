import { InputError } from '../errors.js';

/**
 * A window stated by a person: "START..END", each either seconds from the log's first sample or
 * an ISO 8601 timestamp (then the log must carry absolute time). Returns seconds from the start.
 */
export function parseWindowSetting(text: string, t0EpochMs: number | null): { startS: number; endS: number } {
  const parts = text.split('..');
  if (parts.length !== 2 || !parts[0].trim() || !parts[1].trim()) {
    throw new InputError(`window "${text}" is not START..END (seconds from the log's start, or ISO 8601 timestamps)`, { field: 'window' });
  }
  const [startS, endS] = parts.map((p) => toSeconds(p.trim(), t0EpochMs, text));
  if (!(endS > startS)) throw new InputError(`window "${text}" ends before it starts`, { field: 'window' });
  return { startS, endS };
}

function toSeconds(part: string, t0EpochMs: number | null, whole: string): number {
  if (/^[+-]?\d+(\.\d+)?$/.test(part)) return Number(part);
  if (!/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(part)) {
    throw new InputError(`window "${whole}": "${part}" is neither seconds nor an ISO 8601 timestamp`, { field: 'window' });
  }
  if (t0EpochMs === null) {
    throw new InputError(`window "${whole}" uses timestamps but the log has elapsed time only: give seconds`, { field: 'window' });
  }
  const iso = part.replace(' ', 'T');
  const withZone = /([zZ]|[+-]\d{2}:?\d{2})$/.test(iso) ? iso : `${iso}Z`;
  const ms = Date.parse(withZone);
  if (!Number.isFinite(ms)) throw new InputError(`window "${whole}": "${part}" is not a valid timestamp`, { field: 'window' });
  return (ms - t0EpochMs) / 1000;
}
