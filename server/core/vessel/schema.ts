import { z } from 'zod';
import { InputError } from '../errors.js';
import { nameText, noteText, tagText } from '../limits.js';
import { waterDensityKgM3 } from '../units/density.js';
import { shapeSchema } from './shape-schema.js';
import { describeIssue } from './issues.js';
import { jsonErrorOffset, lineOf } from './json-position.js';
import { crossFieldProblems } from './sanity.js';

export { shapeSchema } from './shape-schema.js';

export const OUTLET_TYPES = [
  'sharp-edged',
  'square-edged-short-tube',
  'rounded',
  'nozzle',
  'valve',
  'other',
] as const;

const outletSchema = z.strictObject({
  boreM: z.number().positive(),
  boreToleranceM: z.number().min(0).optional(),
  elevationM: z.number().min(0),
  /** ± limits of the outlet centreline's elevation, m. */
  elevationToleranceM: z.number().min(0).optional(),
  type: z.enum(OUTLET_TYPES).optional(),
  id: tagText().min(1).optional(),
});

const sensorSchema = z.strictObject({
  /** Elevation of the sensor's zero above the lowest interior point, m (may be negative). */
  zeroElevationM: z.number().optional(),
  /** Elevation of a top-mounted distance gauge's reference face above the lowest interior point, m. */
  mountElevationM: z.number().positive().optional(),
  /** ± limits of zeroElevationM (or of mountElevationM for a top-mounted gauge), m. */
  zeroElevationToleranceM: z.number().min(0).optional(),
  mountElevationToleranceM: z.number().min(0).optional(),
  /** ± limits of the scale (span) error as a fraction of the reading (0.001 = 0.1 %). */
  spanErrorFraction: z.number().min(0).max(0.5).optional(),
  /** The smallest step of the readings, m (1 mm quantisation: 0.001). */
  resolutionM: z.number().min(0).optional(),
  /** ± limits of a barometric series' offset, Pa (absolute-pressure logs). */
  barometerTolerancePa: z.number().min(0).optional(),
});

const loggerSchema = z.strictObject({
  /** ± limits of the logger clock's rate error as a fraction (20 ppm: 0.00002). */
  clockRateErrorFraction: z.number().min(0).max(0.1).optional(),
});

// Water temperature bounds are those of waterDensityKgM3.
const fluidSchema = z.union([
  z.strictObject({
    densityKgM3: z.number().positive(),
    densityToleranceKgM3: z.number().min(0).optional(),
  }),
  z.strictObject({
    temperatureC: z.number().min(0).max(100),
    temperatureToleranceC: z.number().min(0).optional(),
  }),
]);

const vesselObject = z.strictObject({
  name: nameText().min(1),
  site: nameText().optional(),
  /** The tag painted on the vessel (e.g. "FD-2"): outlets may be named by it (efflux trend FD-2). */
  tag: tagText().min(1).optional(),
  shape: shapeSchema,
  outlet: outletSchema,
  sensor: sensorSchema.optional(),
  fluid: fluidSchema.optional(),
  logger: loggerSchema.optional(),
  gravityMS2: z.number().positive().optional(),
  notes: noteText().optional(),
});

/** The vessel file, with the cross-field checks (run only once every field is well formed). */
export const vesselSchema = vesselObject.superRefine(
  (v, ctx) => {
    for (const p of crossFieldProblems(v))
      ctx.addIssue({ code: 'custom', message: p.message, path: p.path });
  },
  { when: (payload) => payload.issues.length === 0 },
);

export type VesselSpec = z.infer<typeof vesselSchema>;

/** Check a parsed vessel document; the first problem becomes one InputError naming its field. */
export function validateVessel(value: unknown, fileName?: string): VesselSpec {
  const r = vesselSchema.safeParse(value);
  if (r.success) return r.data;
  const { field, message } = describeIssue(r.error.issues[0], value);
  throw new InputError(message, { file: fileName, field: field === '' ? undefined : field });
}

/** Read a vessel file's text (JSON); syntax errors carry the line. */
export function parseVesselFile(text: string, fileName: string): VesselSpec {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  let value: unknown;
  try {
    value = JSON.parse(body);
  } catch (e) {
    const offset = jsonErrorOffset(body);
    const line = lineOf(body, offset < 0 ? body.length : offset);
    const what =
      body.trim() === ''
        ? 'the file is empty'
        : (e as Error).message.replace(/, ".*" is not valid JSON$/s, '');
    throw new InputError(`not valid JSON: ${what}`, { file: fileName, line });
  }
  return validateVessel(value, fileName);
}

const ASSUMED_WATER_TEMPERATURE_C = 20;

/**
 * The liquid's density and where it came from, in this order: a density in the vessel file;
 * water at the temperature measured during the test (the argument); water at the vessel file's
 * temperature; else water at 20 °C, said to be assumed.
 */
export function fluidDensityKgM3(
  spec: VesselSpec,
  temperatureC?: number,
): { value: number; source: string } {
  const fluid = spec.fluid;
  if (fluid && 'densityKgM3' in fluid) {
    return { value: fluid.densityKgM3, source: 'density given in the vessel file' };
  }
  const cite = 'air-free water at 101.325 kPa (Tanaka et al. 2001 to 40 °C, Kell 1975 above)';
  if (temperatureC !== undefined) {
    return {
      value: waterDensityKgM3(temperatureC),
      source: `${cite} at ${temperatureC} °C, the temperature measured during the test`,
    };
  }
  if (fluid && 'temperatureC' in fluid) {
    return {
      value: waterDensityKgM3(fluid.temperatureC),
      source: `${cite} at ${fluid.temperatureC} °C, from the vessel file`,
    };
  }
  return {
    value: waterDensityKgM3(ASSUMED_WATER_TEMPERATURE_C),
    source: `${cite} at ${ASSUMED_WATER_TEMPERATURE_C} °C, assumed: no density or temperature was given`,
  };
}
