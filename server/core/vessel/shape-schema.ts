import { z } from 'zod';
import type { ShapeSpec } from '../geometry/spec.js';

const length = z.number().positive();

/** The shape object of a vessel file; mirrors ShapeSpec in geometry/spec.ts (checked below). */
export const shapeSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('vertical-cylinder'), diameterM: length, heightM: length.optional() }),
  z.strictObject({ kind: z.literal('rectangular'), lengthM: length, widthM: length, heightM: length.optional() }),
  z.strictObject({ kind: z.literal('horizontal-cylinder'), diameterM: length, lengthM: length }),
  z.strictObject({ kind: z.literal('sphere'), diameterM: length }),
  z.strictObject({
    kind: z.literal('cone-bottom'),
    diameterM: length,
    coneHeightM: length,
    heightM: length.optional(),
  }),
  z.strictObject({
    kind: z.literal('table'),
    points: z.array(z.tuple([z.number().min(0), z.number().positive()])).min(2),
  }),
  z.strictObject({ kind: z.literal('elliptical-head-cylinder'), diameterM: length, heightM: length.optional() }),
]);

// Compile-time proof that the schema and the geometry's type describe the same thing.
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const shapesAgree: Same<z.infer<typeof shapeSchema>, ShapeSpec> = true;
void shapesAgree;
