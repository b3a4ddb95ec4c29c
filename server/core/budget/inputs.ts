import type { ShapeSpec } from '../geometry/spec.js';
import { waterDensityKgM3 } from '../units/density.js';
import type { VesselSpec } from '../vessel/schema.js';

/**
 * The inputs of a drain test that carry uncertainty besides the fit's own scatter, read from the
 * vessel file beside their values. Every stated tolerance is ± limits of a rectangular
 * distribution, u = T/√3 (JCGM 100:2008, 4.3.7); the resolution δ gives u = δ/√12 (GUM F.2.2.1).
 * An input the file does not state counts as 0 with a note, except the water temperature when
 * none is given at all: 20 °C ± 10 °C, a stated assumption (it matters only for pressure sensors).
 */
export type Effect =
  /** A number in the vessel file's shape or outlet (a path like "shape.diameterM"): the setting changes. */
  | { kind: 'vessel-field'; path: string }
  /** The elevation of the sensor's zero (θ's fixed sensor zero). */
  | { kind: 'sensor-zero' }
  /** Every reading shifted by `perUnit`·x (a top-mounted gauge's mount, a barometric offset). */
  | { kind: 'reading-offset'; perUnit: number }
  /** Every reading multiplied by 1/(1 + `perUnit`·x) (span error; density: perUnit = 1/ρ). */
  | { kind: 'reading-scale'; perUnit: number }
  /** The clock runs at (1 + x) times the true rate: true time = t·(1 + x). */
  | { kind: 'clock-rate' }
  /** Independent per-reading errors (quantisation): already inside the fit's scatter. */
  | { kind: 'per-reading' }
  /** The outlet's bore: enters Cd only. */
  | { kind: 'bore' };

export type Source = 'stated' | 'assumed' | 'not stated';

export interface BudgetInput {
  key: string;
  /** The input in words, for the table. */
  input: string;
  /** Where it is (or would be) stated in the vessel file. */
  field: string;
  value: number;
  unit: string;
  standardUncertainty: number;
  distribution: 'rectangular';
  source: Source;
  note?: string;
  effect: Effect;
  /** Step for the central difference of the model in this input (its own unit). */
  step: number;
  /** Multiplies the reading-scale/offset effect (temperature → density). */
  chain?: number;
}

export interface InputContext {
  vessel: VesselSpec;
  /** How the level was measured (the log's level column). */
  quantity: 'level' | 'gauge-pressure' | 'absolute-pressure' | 'distance-from-top';
  densityKgM3: number;
  /** Where the density came from (fluidDensityKgM3's source). */
  densitySource: string;
  datumFitted: boolean;
  gravity: number;
}

const RECT = Math.sqrt(3);
const ASSUMED_TEMPERATURE_C = 20;
const ASSUMED_TEMPERATURE_HALF_WIDTH_C = 10;

function line(
  key: string,
  input: string,
  field: string,
  value: number,
  unit: string,
  tolerance: number | undefined,
  effect: Effect,
  step: number,
  divisor = RECT,
): BudgetInput {
  const stated = tolerance !== undefined;
  return {
    key,
    input,
    field,
    value,
    unit,
    standardUncertainty: stated ? tolerance / divisor : 0,
    distribution: 'rectangular',
    source: stated ? 'stated' : 'not stated',
    note: stated ? undefined : `not stated (${field}): counted as 0`,
    effect,
    step,
  };
}

/** The dimension lines of each shape kind (paths into the vessel file). */
function shapeInputs(shape: ShapeSpec): BudgetInput[] {
  const dim = (name: string, label: string, value: number, tol: number | undefined) =>
    line(
      `shape.${name}`,
      label,
      `shape.${name.replace(/M$/, 'ToleranceM')}`,
      value,
      'm',
      tol,
      { kind: 'vessel-field', path: `shape.${name}` },
      value * 1e-5,
    );
  switch (shape.kind) {
    case 'vertical-cylinder':
    case 'sphere':
    case 'elliptical-head-cylinder':
      return [dim('diameterM', 'vessel diameter', shape.diameterM, shape.diameterToleranceM)];
    case 'rectangular':
      return [
        dim('lengthM', 'vessel length', shape.lengthM, shape.lengthToleranceM),
        dim('widthM', 'vessel width', shape.widthM, shape.widthToleranceM),
      ];
    case 'horizontal-cylinder':
      return [
        dim('diameterM', 'vessel diameter', shape.diameterM, shape.diameterToleranceM),
        dim('lengthM', 'vessel length', shape.lengthM, shape.lengthToleranceM),
      ];
    case 'cone-bottom':
      return [
        dim('diameterM', 'vessel diameter', shape.diameterM, shape.diameterToleranceM),
        dim('coneHeightM', 'cone height', shape.coneHeightM, shape.coneHeightToleranceM),
      ];
    case 'table': {
      const tol = shape.pointTolerances;
      const out: BudgetInput[] = [];
      shape.points.forEach(([h, a], i) => {
        const th = tol?.[i]?.[0];
        const ta = tol?.[i]?.[1];
        const field = `shape.pointTolerances.${i}`;
        out.push(
          line(
            `shape.points.${i}.1`,
            `stage–area point ${i + 1}: area at ${h} m`,
            field,
            a,
            'm²',
            ta,
            { kind: 'vessel-field', path: `shape.points.${i}.1` },
            a * 1e-5,
          ),
        );
        out.push(
          line(
            `shape.points.${i}.0`,
            `stage–area point ${i + 1}: height`,
            field,
            h,
            'm',
            th,
            { kind: 'vessel-field', path: `shape.points.${i}.0` },
            1e-5,
          ),
        );
      });
      return out;
    }
  }
}

export function budgetInputs(ctx: InputContext): BudgetInput[] {
  const { vessel, quantity } = ctx;
  const s = vessel.sensor ?? {};
  const out: BudgetInput[] = [...shapeInputs(vessel.shape)];
  out.push(
    line(
      'outlet.elevationM',
      'outlet centreline elevation',
      'outlet.elevationToleranceM',
      vessel.outlet.elevationM,
      'm',
      vessel.outlet.elevationToleranceM,
      { kind: 'vessel-field', path: 'outlet.elevationM' },
      1e-5,
    ),
  );
  if (!ctx.datumFitted) {
    if (quantity === 'distance-from-top' && s.mountElevationM !== undefined) {
      out.push(
        line(
          'sensor.mountElevationM',
          'gauge mount elevation',
          'sensor.mountElevationToleranceM',
          s.mountElevationM,
          'm',
          s.mountElevationToleranceM,
          { kind: 'reading-offset', perUnit: 1 },
          1e-5,
        ),
      );
    } else {
      out.push(
        line(
          'sensor.zeroElevationM',
          'sensor zero elevation',
          'sensor.zeroElevationToleranceM',
          s.zeroElevationM ?? 0,
          'm',
          s.zeroElevationToleranceM,
          { kind: 'sensor-zero' },
          1e-5,
        ),
      );
    }
  }
  out.push(
    line(
      'sensor.spanError',
      'sensor scale (span) error',
      'sensor.spanErrorFraction',
      0,
      '1',
      s.spanErrorFraction,
      { kind: 'reading-scale', perUnit: 1 },
      1e-5,
    ),
  );
  out.push(
    line(
      'sensor.resolution',
      'sensor resolution (per reading)',
      'sensor.resolutionM',
      s.resolutionM ?? 0,
      'm',
      s.resolutionM === undefined ? undefined : s.resolutionM / 2,
      { kind: 'per-reading' },
      1,
    ),
  );
  const pressure = quantity === 'gauge-pressure' || quantity === 'absolute-pressure';
  if (pressure) out.push(densityInput(ctx));
  if (quantity === 'absolute-pressure') {
    const perPa = 1 / (ctx.densityKgM3 * ctx.gravity);
    out.push(
      line(
        'sensor.barometer',
        'barometric series offset',
        'sensor.barometerTolerancePa',
        0,
        'Pa',
        s.barometerTolerancePa,
        { kind: 'reading-offset', perUnit: perPa },
        1,
      ),
    );
  }
  out.push(
    line(
      'logger.clockRate',
      'logger clock rate error',
      'logger.clockRateErrorFraction',
      0,
      '1',
      vessel.logger?.clockRateErrorFraction,
      { kind: 'clock-rate' },
      1e-5,
    ),
  );
  out.push(
    line(
      'outlet.boreM',
      'outlet bore (Cd only)',
      'outlet.boreToleranceM',
      vessel.outlet.boreM,
      'm',
      vessel.outlet.boreToleranceM,
      { kind: 'bore' },
      vessel.outlet.boreM * 1e-5,
    ),
  );
  return out;
}

/** Pressure sensors: h = p/(ρ·g), so the readings scale with 1/ρ. */
function densityInput(ctx: InputContext): BudgetInput {
  const rho = ctx.densityKgM3;
  const fluid = ctx.vessel.fluid;
  if (fluid && 'densityKgM3' in fluid) {
    return line(
      'fluid.density',
      'liquid density',
      'fluid.densityToleranceKgM3',
      rho,
      'kg/m³',
      fluid.densityToleranceKgM3,
      { kind: 'reading-scale', perUnit: 1 / rho },
      rho * 1e-5,
    );
  }
  // temperature → density: the chain factor dρ/dT (central difference of the water table)
  const temperatureInput = (
    t: number,
    half: number | undefined,
    source: Source,
    note?: string,
  ): BudgetInput => {
    const dRhoDt =
      (waterDensityKgM3(Math.min(t + 0.01, 100)) - waterDensityKgM3(Math.max(t - 0.01, 0))) /
      (Math.min(t + 0.01, 100) - Math.max(t - 0.01, 0));
    const base = line(
      'fluid.temperature',
      'liquid temperature (→ density)',
      'fluid.temperatureToleranceC',
      t,
      '°C',
      half,
      { kind: 'reading-scale', perUnit: 1 / rho },
      1e-3,
    );
    return { ...base, source, note: note ?? base.note, chain: dRhoDt };
  };
  if (fluid && 'temperatureC' in fluid) {
    if (/measured during the test/.test(ctx.densitySource))
      return temperatureInput(
        fluid.temperatureC,
        undefined,
        'not stated',
        "density from the log's temperature column; its uncertainty is not stated: counted as 0",
      );
    return temperatureInput(
      fluid.temperatureC,
      fluid.temperatureToleranceC,
      fluid.temperatureToleranceC === undefined ? 'not stated' : 'stated',
    );
  }
  if (/measured during the test/.test(ctx.densitySource)) {
    return temperatureInput(
      ASSUMED_TEMPERATURE_C,
      undefined,
      'not stated',
      "density from the log's temperature column; its uncertainty is not stated: counted as 0",
    );
  }
  return temperatureInput(
    ASSUMED_TEMPERATURE_C,
    ASSUMED_TEMPERATURE_HALF_WIDTH_C,
    'assumed',
    `no temperature or density given: water at ${ASSUMED_TEMPERATURE_C} ± ${ASSUMED_TEMPERATURE_HALF_WIDTH_C} °C assumed (rectangular)`,
  );
}

/** A copy of a vessel-file object with the number at `path` (dots, numeric parts index arrays) changed by delta. */
export function withFieldChanged<T>(doc: T, path: string, delta: number): T {
  const copy = structuredClone(doc) as unknown as Record<string, unknown>;
  const parts = path.split('.');
  let node: any = copy;
  for (let i = 0; i < parts.length - 1; i++) node = node[parts[i]];
  const last = parts[parts.length - 1];
  node[last] = (node[last] as number) + delta;
  return copy as unknown as T;
}
