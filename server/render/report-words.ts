/**
 * A report's inputs in words a reader uses: the vessel file's shape, sensor, liquid and logger,
 * the analysis settings, parameter names; and stored messages cleared of the JSON field names
 * they sometimes carry (`shape.diameterToleranceM` → "vessel diameter tolerance"). Numbers go
 * through report-format.ts only. Pure.
 */
import { metresText, millimetresText, sig, type UnitSystem } from './report-format.js';

type Json = Record<string, unknown>;
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const tol = (v: unknown, text: (x: number) => string) =>
  num(v) === null ? '' : ` (± ${text(num(v)!)})`;
const mmTol = (v: unknown, units: UnitSystem) => tol(v, (x) => millimetresText(x, units));

/**
 * Words for the field and parameter names the stored records use. Keyed by the last part of a
 * path and, where the last part is ambiguous, by the whole path.
 */
const NAME_WORDS: Record<string, string> = {
  // vessel file
  diameterM: 'vessel diameter',
  heightM: 'vessel height',
  lengthM: 'vessel length',
  widthM: 'vessel width',
  coneHeightM: 'cone height',
  diameterToleranceM: 'vessel diameter tolerance',
  lengthToleranceM: 'vessel length tolerance',
  widthToleranceM: 'vessel width tolerance',
  coneHeightToleranceM: 'cone height tolerance',
  pointTolerances: 'plan-area table tolerances',
  boreM: 'outlet bore',
  boreToleranceM: 'outlet bore tolerance',
  elevationM: 'outlet centreline elevation',
  elevationToleranceM: 'outlet centreline elevation tolerance',
  zeroElevationM: 'sensor zero elevation',
  mountElevationM: 'gauge mount elevation',
  zeroElevationToleranceM: 'sensor zero elevation tolerance',
  mountElevationToleranceM: 'gauge mount elevation tolerance',
  spanErrorFraction: 'sensor scale (span) error',
  resolutionM: 'sensor resolution',
  barometerTolerancePa: 'barometer offset tolerance',
  clockRateErrorFraction: 'logger clock rate error',
  densityKgM3: 'liquid density',
  densityToleranceKgM3: 'liquid density tolerance',
  temperatureC: 'water temperature',
  temperatureToleranceC: 'water temperature tolerance',
  gravityMS2: 'gravitational acceleration',
  // parameters and results
  effectiveAreaM2: 'Cd·a',
  dischargeCoefficient: 'Cd',
  initialReadingM: 'initial reading',
  sensorZeroElevationM: 'sensor zero elevation',
  sensorZeroM: 'sensor zero elevation',
  inflowM3S: 'constant inflow',
  headExponent: 'head exponent n',
  exponent: 'head exponent n',
  // settings
  timeColumn: 'time column',
  levelColumn: 'level column',
  dateOrder: 'date order',
  levelTag: 'level tag',
  baroTag: 'barometric tag',
  fitInflow: 'fit a constant inflow',
  fitDatum: 'fit the sensor zero',
  fitExponent: 'fit the head exponent',
};

const PATH_WORDS: Record<string, string> = {
  'outlet.elevationToleranceM': 'outlet centreline elevation tolerance',
  'outlet.elevationM': 'outlet centreline elevation',
  'sensor.zeroElevationToleranceM': 'sensor zero elevation tolerance',
  'shape.heightM': 'vessel height',
};

/** Words for a field or parameter name (or a dotted path), or null when there are none. */
export function nameWords(name: string): string | null {
  if (PATH_WORDS[name]) return PATH_WORDS[name];
  const last = name.split('.').pop()!;
  return NAME_WORDS[last] ?? null;
}

/** A stored message with any field name or dotted path in it said in words. */
export function plainNames(text: string): string {
  return text.replace(/\b[a-z][A-Za-z0-9]*(?:\.[a-z][A-Za-z0-9]*)*\b/g, (token) =>
    /[A-Z.]/.test(token) ? (nameWords(token) ?? token) : token,
  );
}

const SHAPE_NAMES: Record<string, string> = {
  'vertical-cylinder': 'Vertical cylinder',
  rectangular: 'Rectangular tank',
  'horizontal-cylinder': 'Horizontal cylinder',
  sphere: 'Sphere',
  'cone-bottom': 'Vertical cylinder on a cone bottom (hopper)',
  table: 'Plan area from a survey table',
  'elliptical-head-cylinder': 'Vertical cylinder on a 2:1 elliptical head',
};

/** The vessel's shape in words: "Vertical cylinder, diameter 3.200 m, height 4.000 m". */
export function geometryWords(shape: unknown, units: UnitSystem): string {
  if (!shape || typeof shape !== 'object') return 'not on record';
  const s = shape as Json;
  const kind = String(s.kind ?? '');
  const parts = [SHAPE_NAMES[kind] ?? `shape "${kind}"`];
  const dim = (label: string, key: string, tolKey?: string) => {
    if (num(s[key]) !== null)
      parts.push(
        `${label} ${metresText(num(s[key]), units)}${tolKey ? mmTol(s[tolKey], units) : ''}`,
      );
  };
  if (kind === 'table') {
    const pts = Array.isArray(s.points) ? (s.points as [number, number][]) : [];
    if (pts.length) {
      const areas = pts.map((p) => p[1]);
      parts.push(
        `${pts.length} surveyed levels from ${metresText(pts[0][0], units)} to ${metresText(pts[pts.length - 1][0], units)}`,
        `plan area ${sig(Math.min(...areas), 4)} m² to ${sig(Math.max(...areas), 4)} m²`,
      );
    }
    if (Array.isArray(s.pointTolerances)) parts.push('with stated tolerances per point');
    return parts.join(', ');
  }
  dim('diameter', 'diameterM', 'diameterToleranceM');
  dim('length', 'lengthM', 'lengthToleranceM');
  dim('width', 'widthM', 'widthToleranceM');
  dim('cone height', 'coneHeightM', 'coneHeightToleranceM');
  dim('height', 'heightM');
  return parts.join(', ');
}

/** The sensor in words; elevations are above the vessel's datum, its lowest interior point. */
export function sensorWords(sensor: unknown, units: UnitSystem): string {
  const s = (sensor ?? {}) as Json;
  const parts: string[] = [];
  const z = num(s.zeroElevationM);
  if (z !== null)
    parts.push(
      `Sensor zero ${metresText(Math.abs(z), units)} ${z < 0 ? 'below' : 'above'} the vessel's datum (its lowest interior point)${mmTol(s.zeroElevationToleranceM, units)}`,
    );
  const mount = num(s.mountElevationM);
  if (mount !== null)
    parts.push(
      `gauge reading down from a face ${metresText(mount, units)} above the datum${mmTol(s.mountElevationToleranceM, units)}`,
    );
  if (num(s.spanErrorFraction) !== null)
    parts.push(`scale (span) error within ± ${sig(num(s.spanErrorFraction)! * 100, 3)} %`);
  if (num(s.resolutionM) !== null)
    parts.push(`readings in steps of ${millimetresText(num(s.resolutionM), units)}`);
  if (num(s.barometerTolerancePa) !== null)
    parts.push(`barometer offset within ± ${sig(num(s.barometerTolerancePa), 3)} Pa`);
  if (!parts.length) return 'Sensor zero at the vessel’s datum (nothing stated in the vessel file)';
  return parts.join('; ');
}

/** The liquid as the vessel file states it. */
export function fluidWords(fluid: unknown): string {
  if (!fluid || typeof fluid !== 'object') return 'not stated in the vessel file';
  const f = fluid as Json;
  if (num(f.densityKgM3) !== null)
    return `density ${sig(num(f.densityKgM3), 5)} kg/m³${tol(f.densityToleranceKgM3, (x) => `${sig(x, 3)} kg/m³`)}`;
  if (num(f.temperatureC) !== null)
    return `water at ${sig(num(f.temperatureC), 4)} °C${tol(f.temperatureToleranceC, (x) => `${sig(x, 3)} °C`)}`;
  return 'not stated in the vessel file';
}

const QUANTITY_WORDS: Record<string, string> = {
  level: 'level',
  'gauge-pressure': 'gauge pressure',
  'absolute-pressure': 'absolute pressure (with a barometric log)',
  'distance-from-top': 'distance down from the top',
};
const DATE_ORDER_WORDS: Record<string, string> = {
  dmy: 'day, month, year',
  mdy: 'month, day, year',
  ymd: 'year, month, day',
};

/** One setting as a [label, value] row a reader understands. */
export function settingRow(key: string, value: unknown): [string, string] {
  const v = typeof value === 'string' ? value : JSON.stringify(value);
  switch (key) {
    case 'fitInflow':
      return ['constant inflow', value ? 'fitted' : 'not fitted (none assumed)'];
    case 'fitDatum':
      return ['sensor zero', value ? 'fitted from the data' : 'taken from the vessel file'];
    case 'fitExponent':
      return ['head exponent n', value ? 'fitted' : 'held at 0.5 (orifice law)'];
    case 'quantity':
      return ['what the log measures', QUANTITY_WORDS[v] ?? v];
    case 'dateOrder':
      return ['date order', DATE_ORDER_WORDS[v] ?? v];
    case 'tz':
      return ['time zone of the log', v];
    case 'unit':
      return ['unit of the readings', v];
    case 'delimiter':
      return ['field separator', v === '\t' ? 'tab' : `“${v}”`];
    case 'decimal':
      return ['decimal mark', v === ',' ? 'comma' : 'point'];
    case 'window':
      return ['drain window', `${v.replace('..', ' to ')} (stated)`];
    case 'sheet':
      return ['workbook sheet', v];
    default:
      return [nameWords(key) ?? key, v];
  }
}

/** The settings as labelled rows; an empty list says everything was detected. */
export function settingRows(settings: Record<string, unknown>): [string, string][] {
  const rows = Object.entries(settings).map(([k, v]) => settingRow(k, v));
  return rows.length ? rows : [['settings given', 'none: everything detected from the log']];
}

/** The settings in one line for a table cell. */
export function settingsInline(settings: Record<string, unknown>): string {
  const rows = Object.entries(settings).map(([k, v]) => settingRow(k, v));
  return rows.length ? rows.map(([l, v]) => `${l}: ${v}`).join('; ') : 'all detected';
}

const PARAMETER_WORDS: Record<string, [string, string]> = {
  effectiveAreaM2: ['effective area', 'Cd·a'],
  initialReadingM: ['initial reading', 'y₀'],
  sensorZeroElevationM: ['sensor zero elevation', 'z_s'],
  sensorZeroM: ['sensor zero elevation', 'z_s'],
  inflowM3S: ['constant inflow', 'Q_in'],
  headExponent: ['head exponent', 'n'],
  exponent: ['head exponent', 'n'],
};

/** A parameter's name and symbol in words (the report model keeps unknown names as stored). */
export function parameterWords(name: string, symbol: string): [string, string] {
  const w = PARAMETER_WORDS[name] ?? PARAMETER_WORDS[symbol];
  return w ?? [plainNames(name), plainNames(symbol)];
}
