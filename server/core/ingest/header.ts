/**
 * What a column header says: a role (time, level, pressure, …) from its words and a unit from
 * brackets ("Level [cm]", "Stage (ft)") or a trailing unit word ("level_mm", "P_abs kPa").
 */
import { lengthFactorToM, pressureFactorToPa, temperatureUnit } from '../units/index.js';
import type { ColumnRole } from './series.js';

export type TimeKind = 'epoch' | 'elapsed' | 'absolute' | 'date' | 'clock' | 'unknown';
export type UnitKind = 'length' | 'pressure' | 'temperature' | 'time';

export interface HeaderReading {
  role: ColumnRole;
  unit: string | null;
  unitKind: UnitKind | null;
  /** For time-like columns: what the words say about the kind of time. */
  timeKind: TimeKind | null;
  /** For pressure: the reference the words or unit name, when they name one. */
  pressureRef: 'gauge' | 'absolute' | null;
  reason: string;
}

const TIME_UNITS = new Map<string, number>();
for (const [names, ms] of [
  [['ms', 'msec', 'millisecond', 'milliseconds'], 1],
  [['s', 'sec', 'secs', 'second', 'seconds'], 1000],
  [['min', 'mins', 'minute', 'minutes'], 60_000],
  [['h', 'hr', 'hrs', 'hour', 'hours'], 3_600_000],
  [['d', 'day', 'days'], 86_400_000],
] as const) {
  for (const n of names) TIME_UNITS.set(n, ms);
}

/** Milliseconds per one of a time unit, or null. */
export function timeUnitMs(unit: string): number | null {
  return TIME_UNITS.get(unit.trim().toLowerCase()) ?? null;
}

export function unitKind(unit: string): UnitKind | null {
  if (!unit.trim()) return null;
  if (temperatureUnit(unit)) return 'temperature';
  if (timeUnitMs(unit) !== null && unit.trim() !== 'm') return 'time';
  if (lengthFactorToM(unit) !== null) return 'length';
  if (pressureFactorToPa(unit) !== null) return 'pressure';
  return null;
}

function splitUnit(header: string): { name: string; unit: string | null; how: string } {
  const br = /^(.*?)[[({]\s*([^\])}]*?)\s*[\])}](.*)$/.exec(header);
  if (br) return { name: `${br[1]} ${br[3]}`.trim(), unit: br[2] || null, how: 'in brackets' };
  const deg = /^(.*?)\s*(°\s*[CFK])$/i.exec(header);
  if (deg && deg[1]) return { name: deg[1], unit: deg[2], how: 'after the name' };
  const parts = header.split(/[\s_]+/).filter(Boolean);
  if (parts.length > 1 && unitKind(parts[parts.length - 1]) !== null) {
    return {
      name: parts.slice(0, -1).join(' '),
      unit: parts[parts.length - 1],
      how: 'after the name',
    };
  }
  return { name: header, unit: null, how: '' };
}

const has = (tokens: string[], ...words: string[]): string | undefined =>
  words.find((w) => tokens.includes(w));
const contains = (compact: string, ...words: string[]): string | undefined =>
  words.find((w) => compact.includes(w));

export function readHeader(header: string): HeaderReading {
  const text = header.trim();
  const { name, unit, how } = splitUnit(text);
  const kind = unit ? unitKind(unit) : null;
  const tokens = name
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter(Boolean);
  const compact = tokens.join('');
  const unitNote = unit
    ? `; unit "${unit}" ${how}${kind ? '' : ' (not a unit we know)'}`
    : '; no unit given';
  const out = (
    role: ColumnRole,
    why: string,
    timeKind: TimeKind | null = null,
    pressureRef: 'gauge' | 'absolute' | null = null,
  ): HeaderReading => ({
    role,
    unit,
    unitKind: kind,
    timeKind,
    pressureRef,
    reason: `header "${text}": ${why}${unitNote}`,
  });

  let w: string | undefined;
  if ((w = has(tokens, 'epoch', 'unix', 'posix')))
    return out('time', `word "${w}" means time since 1970`, 'epoch');
  if (kind === 'temperature' || (w = contains(compact, 'temp')))
    return out('temperature', w ? `word "${w}…" means temperature` : 'a temperature unit');
  if ((w = has(tokens, 'elapsed', 'duration', 'runtime', 'seconds', 'secs')))
    return out('time', `word "${w}" means elapsed time`, 'elapsed');
  if (
    contains(compact, 'timestamp', 'datetime') ||
    (tokens.includes('date') && tokens.includes('time'))
  )
    return out('time', 'words name a date and time', 'absolute');
  if (has(tokens, 'date', 'day')) return out('date', 'word "date" means a calendar date', 'date');
  if ((w = has(tokens, 'time', 't', 'clock'))) {
    if (kind === 'time')
      return out('time', `word "${w}" with a time unit means elapsed time`, 'elapsed');
    return out('time', `word "${w}" means time`, 'unknown');
  }
  if (
    (w = contains(compact, 'distance', 'ullage', 'airgap', 'tosurface', 'towater', 'range')) ||
    (w = has(tokens, 'dist'))
  )
    return out('distance-from-top', `word "${w}" means distance down to the surface`);
  const pressureWord =
    contains(compact, 'pressure', 'baro') ??
    has(tokens, 'p', 'pres', 'press', 'pabs', 'pg', 'pgauge', 'atm');
  if (pressureWord && kind !== 'length') {
    const abs =
      has(tokens, 'abs', 'absolute', 'pabs', 'atm', 'atmospheric') ??
      contains(compact, 'baro') ??
      (unit && /psia$/i.test(unit) ? unit : undefined);
    const gauge =
      has(tokens, 'gauge', 'gage', 'g', 'rel', 'relative', 'vented', 'pg', 'pgauge') ??
      (unit && /psig$/i.test(unit) ? unit : undefined);
    if (abs)
      return out(
        'absolute-pressure',
        `word "${pressureWord}" with "${abs}" means absolute pressure`,
        null,
        'absolute',
      );
    if (gauge)
      return out(
        'gauge-pressure',
        `word "${pressureWord}" with "${gauge}" means gauge pressure`,
        null,
        'gauge',
      );
    return out('gauge-pressure', `word "${pressureWord}" means pressure (reference not stated)`);
  }
  if (
    (w =
      contains(compact, 'level', 'stage', 'depth', 'height', 'head') ??
      has(tokens, 'lvl', 'wl', 'h'))
  )
    return out('level', `word "${w}" means liquid level`);
  if (kind === 'pressure') return out('gauge-pressure', 'a pressure unit (reference not stated)');
  if (kind === 'length') return out('level', 'a length unit');
  if (kind === 'time') return out('time', 'a time unit means elapsed time', 'elapsed');
  return out('other', 'no word we use');
}
