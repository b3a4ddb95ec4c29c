import { parseArgs, type ParseArgsConfig } from 'node:util';
import { InputError } from '../core/errors.js';
import type { AnalysisSettings } from '../core/analysis-contract.js';

/** Reading options shared by `fit` and `inspect`, in the CLI's spelling. */
export const READ_OPTIONS = {
  'time-column': { type: 'string' },
  'level-column': { type: 'string' },
  unit: { type: 'string' },
  quantity: { type: 'string' },
  'date-order': { type: 'string' },
  tz: { type: 'string' },
  baro: { type: 'string' },
  window: { type: 'string' },
  delimiter: { type: 'string' },
  decimal: { type: 'string' },
  'level-tag': { type: 'string' },
  'baro-tag': { type: 'string' },
  sheet: { type: 'string' },
  vessel: { type: 'string' },
  json: { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
} as const satisfies ParseArgsConfig['options'];

export function parseCommandLine<O extends NonNullable<ParseArgsConfig['options']>>(
  argv: string[],
  options: O,
) {
  try {
    return parseArgs({ args: argv, options, allowPositionals: true, strict: true });
  } catch (err) {
    const msg = err instanceof Error ? err.message.split('\n')[0] : String(err);
    throw new InputError(
      `${msg.replace(/^Unknown option/, 'unknown option').replace(/\. To specify.*$/, '')} (see --help)`,
    );
  }
}

const QUANTITIES = ['level', 'gauge-pressure', 'absolute-pressure', 'distance-from-top'] as const;
const DATE_ORDERS = ['dmy', 'mdy', 'ymd'] as const;

export function settingsFrom(
  values: Record<string, string | boolean | undefined>,
): AnalysisSettings {
  const s: AnalysisSettings = {};
  const str = (k: string) => (typeof values[k] === 'string' ? (values[k] as string) : undefined);
  if (str('time-column')) s.timeColumn = str('time-column');
  if (str('level-column')) s.levelColumn = str('level-column');
  if (str('unit')) s.unit = str('unit');
  const q = str('quantity');
  if (q) {
    if (!(QUANTITIES as readonly string[]).includes(q))
      throw new InputError(`--quantity must be one of ${QUANTITIES.join(', ')} (got "${q}")`);
    s.quantity = q as AnalysisSettings['quantity'];
  }
  const d = str('date-order');
  if (d) {
    if (!(DATE_ORDERS as readonly string[]).includes(d))
      throw new InputError(`--date-order must be dmy, mdy or ymd (got "${d}")`);
    s.dateOrder = d as AnalysisSettings['dateOrder'];
  }
  if (str('tz')) s.tz = str('tz');
  if (str('window')) s.window = str('window');
  if (str('delimiter')) s.delimiter = str('delimiter');
  const dec = str('decimal');
  if (dec) {
    if (dec !== '.' && dec !== ',')
      throw new InputError(`--decimal must be "." or "," (got "${dec}")`);
    s.decimal = dec;
  }
  if (str('level-tag')) s.levelTag = str('level-tag');
  if (str('baro-tag')) s.baroTag = str('baro-tag');
  if (str('sheet')) s.sheet = str('sheet');
  if (values['fit-inflow']) s.fitInflow = true;
  if (values['fit-datum']) s.fitDatum = true;
  if (values['fit-exponent']) s.fitExponent = true;
  return s;
}
