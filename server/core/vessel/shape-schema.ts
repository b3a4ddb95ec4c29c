import { z } from 'zod';
import type { ShapeSpec } from '../geometry/spec.js';

const length = z.number().positive();
/** ± limits of a dimension (rectangular distribution), m; see server/core/budget. */
const tol = z.number().min(0).optional();

/** The shape object of a vessel file; mirrors ShapeSpec in geometry/spec.ts (checked below). */
export const shapeSchema = z.discriminatedUnion('kind', [
  z.strictObject({
    kind: z.literal('vertical-cylinder'),
    diameterM: length,
    heightM: length.optional(),
    diameterToleranceM: tol,
  }),
  z.strictObject({
    kind: z.literal('rectangular'),
    lengthM: length,
    widthM: length,
    heightM: length.optional(),
    lengthToleranceM: tol,
    widthToleranceM: tol,
  }),
  z.strictObject({
    kind: z.literal('horizontal-cylinder'),
    diameterM: length,
    lengthM: length,
    diameterToleranceM: tol,
    lengthToleranceM: tol,
  }),
  z.strictObject({ kind: z.literal('sphere'), diameterM: length, diameterToleranceM: tol }),
  z.strictObject({
    kind: z.literal('cone-bottom'),
    diameterM: length,
    coneHeightM: length,
    heightM: length.optional(),
    diameterToleranceM: tol,
    coneHeightToleranceM: tol,
  }),
  z.strictObject({
    kind: z.literal('table'),
    points: z.array(z.tuple([z.number().min(0), z.number().positive()])).min(2),
    pointTolerances: z.array(z.tuple([z.number().min(0), z.number().min(0)])).optional(),
  }),
  z.strictObject({
    kind: z.literal('elliptical-head-cylinder'),
    diameterM: length,
    heightM: length.optional(),
    diameterToleranceM: tol,
  }),
]);

// Compile-time proof that the schema and the geometry's type describe the same thing.
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const shapesAgree: Same<z.infer<typeof shapeSchema>, ShapeSpec> = true;
void shapesAgree;
