/**
 * The measured column to a level reading in metres. A level is scaled; a gauge pressure is a
 * head p/(ρ·g); an absolute pressure needs the barometric pressure at the same instant
 * subtracted first; a distance down from a top-mounted sensor is turned upside down.
 */
import { InputError } from '../errors.js';
import { STANDARD_GRAVITY_MS2, temperatureToC, waterDensityKgM3 } from '../units/index.js';
import type { ReadOptions } from './options.js';
import type { Plan } from './plan.js';
import type { ReadNote } from './series.js';

export interface BaroSeries {
  fileName: string;
  /** Epoch ms, ascending. */
  timeMs: Float64Array;
  pa: Float64Array;
}

export interface LevelInput {
  n: number;
  timeMs: Float64Array;
  value: Float64Array;
  line: Int32Array;
  /** Temperature in °C, when the log has it. */
  tempC: Float64Array | null;
  absoluteTime: boolean;
}

const iso = (ms: number) => new Date(ms).toISOString();

function positive(
  v: number | undefined,
  name: string,
  fileName: string,
  lo: number,
  hi: number,
): number | undefined {
  if (v === undefined) return undefined;
  if (!(Number.isFinite(v) && v >= lo && v <= hi))
    throw new InputError(`${name} must be a number between ${lo} and ${hi}, got ${v}`, {
      file: fileName,
      field: name,
    });
  return v;
}

/**
 * Temperatures of the log in °C, refusing impossible ones with their line. Every temperature
 * scale is affine in °C, so the units module is asked once for the offset and the slope.
 */
export function temperaturesC(
  raw: Float64Array,
  n: number,
  unit: string,
  line: Int32Array,
  fileName: string,
  field: string,
): Float64Array {
  const out = new Float64Array(n);
  const at0 = temperatureToC(0, unit),
    slope = temperatureToC(1, unit) - at0;
  for (let i = 0; i < n; i++) {
    const c = at0 + slope * raw[i];
    if (!(c >= -273.15))
      throw new InputError(`temperature ${raw[i]} ${unit} is below absolute zero`, {
        file: fileName,
        line: line[i],
        field,
      });
    out[i] = c;
  }
  return out;
}

/** value × factor for the first n values; a small function so V8 optimises the pass at once. */
function scaled(value: Float64Array, n: number, factor: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = value[i] * factor;
  return out;
}

export function toLevelM(
  x: LevelInput,
  plan: Plan,
  opts: ReadOptions,
  fileName: string,
  baro: BaroSeries | null,
): { levelM: Float64Array; notes: ReadNote[] } {
  const notes: ReadNote[] = [];
  const { n, value } = x;
  const f = plan.value.factor;
  const q = plan.value.quantity;
  if (q === 'level') return { levelM: scaled(value, n, f), notes };
  const level = new Float64Array(n);
  if (q === 'distance-from-top') {
    const mount = positive(opts.mountElevationM, 'mountElevationM', fileName, -1e4, 1e4);
    if (mount === undefined)
      throw new InputError(
        `"${plan.value.name}" is a distance down from the sensor: give the sensor's mount elevation (--mount-elevation) to turn it into a level`,
        { file: fileName, field: 'mountElevationM' },
      );
    const zero = positive(opts.zeroElevationM, 'zeroElevationM', fileName, -1e4, 1e4) ?? 0;
    if (opts.zeroElevationM === undefined)
      notes.push({
        code: 'level-zero',
        message: 'level zero at elevation 0 (no --zero-elevation given)',
      });
    notes.push({ code: 'distance', message: `level = ${mount} m − distance − ${zero} m` });
    for (let i = 0; i < n; i++) level[i] = mount - value[i] * f - zero;
    return { levelM: level, notes };
  }
  const g = positive(opts.gravityMS2, 'gravityMS2', fileName, 1, 30) ?? STANDARD_GRAVITY_MS2;
  if (opts.gravityMS2 === undefined)
    notes.push({ code: 'gravity', message: `standard gravity ${STANDARD_GRAVITY_MS2} m/s²` });
  const rhoGiven = positive(opts.fluidDensityKgM3, 'fluidDensityKgM3', fileName, 1, 30000);
  let rho: (i: number) => number;
  if (rhoGiven !== undefined) {
    rho = () => rhoGiven;
    notes.push({
      code: 'density',
      message: `fluid density ${rhoGiven} kg/m³, as given${x.tempC ? ' (the temperature column is not used for density)' : ''}`,
    });
  } else if (x.tempC) {
    const dens = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      try {
        dens[i] = waterDensityKgM3(x.tempC[i]);
      } catch (e) {
        throw new InputError(e instanceof Error ? e.message : String(e), {
          file: fileName,
          line: x.line[i],
          field: plan.temperature?.name,
        });
      }
    }
    rho = (i) => dens[i];
    notes.push({
      code: 'density',
      message: `water density from the temperature column "${plan.temperature!.name}", sample by sample`,
    });
  } else if (opts.fallbackDensity && opts.fallbackDensity.valueKgM3 > 0) {
    const fb = opts.fallbackDensity.valueKgM3;
    rho = () => fb;
    notes.push({
      code: 'density',
      message: `${opts.fallbackDensity.source}: ${fb.toFixed(2)} kg/m³ (no temperature column in the log)`,
    });
  } else {
    const d20 = waterDensityKgM3(20);
    rho = () => d20;
    notes.push({
      code: 'density',
      message: `water at 20 °C, ${d20.toFixed(2)} kg/m³ (no --fluid-density and no temperature column)`,
    });
  }
  if (q === 'gauge-pressure') {
    for (let i = 0; i < n; i++) level[i] = (value[i] * f) / (rho(i) * g);
    return { levelM: level, notes };
  }
  // absolute pressure
  if (!baro)
    throw new InputError(
      `"${plan.value.name}" is absolute pressure: give a barometric log (--baro) to subtract`,
      { file: fileName, field: plan.value.name },
    );
  if (!x.absoluteTime)
    throw new InputError(
      'an absolute-pressure log needs dates and times (not elapsed time) to line up with the barometric log',
      { file: fileName },
    );
  const bt = baro.timeMs,
    bp = baro.pa,
    m = bt.length;
  const t0 = x.timeMs[0],
    t1 = x.timeMs[n - 1];
  if (bt[0] > t0 || bt[m - 1] < t1)
    throw new InputError(
      `barometric log ${baro.fileName} covers ${iso(bt[0])} to ${iso(bt[m - 1])}, the test ${iso(t0)} to ${iso(t1)}: it must cover the whole test`,
      { file: baro.fileName },
    );
  let j = 0;
  for (let i = 0; i < n; i++) {
    const t = x.timeMs[i];
    while (j < m - 2 && bt[j + 1] < t) j++;
    const span = bt[j + 1] - bt[j];
    const w = span > 0 ? (t - bt[j]) / span : 0;
    const pb = bp[j] + w * (bp[j + 1] - bp[j]);
    level[i] = (value[i] * f - pb) / (rho(i) * g);
  }
  notes.push({
    code: 'baro',
    message: `barometric pressure from ${baro.fileName} (${m} samples), interpolated linearly in time`,
  });
  return { levelM: level, notes };
}
