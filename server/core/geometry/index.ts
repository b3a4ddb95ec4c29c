import { InputError } from '../errors.js';
import type { VesselShape } from './shape.js';
import type { ShapeSpec } from './spec.js';
import { rectangular, verticalCylinder } from './prism.js';
import { horizontalCylinder } from './horizontal-cylinder.js';
import { sphere } from './sphere.js';
import { coneBottom } from './cone-bottom.js';
import { ellipticalHeadCylinder } from './elliptical-head.js';
import { stageAreaTable } from './table.js';

export type { VesselShape } from './shape.js';
export type { ShapeSpec, ShapeKind } from './spec.js';
export { SHAPE_KINDS } from './spec.js';
export { verticalCylinder, rectangular } from './prism.js';
export { horizontalCylinder } from './horizontal-cylinder.js';
export { sphere } from './sphere.js';
export { coneBottom } from './cone-bottom.js';
export { ellipticalHeadCylinder } from './elliptical-head.js';
export { stageAreaTable } from './table.js';

/** Build the shape a vessel file describes; refuses bad dimensions with InputError (field shape.*). */
export function makeShape(spec: ShapeSpec): VesselShape {
  switch (spec.kind) {
    case 'vertical-cylinder':
      return verticalCylinder(spec);
    case 'rectangular':
      return rectangular(spec);
    case 'horizontal-cylinder':
      return horizontalCylinder(spec);
    case 'sphere':
      return sphere(spec);
    case 'cone-bottom':
      return coneBottom(spec);
    case 'table':
      return stageAreaTable(spec);
    case 'elliptical-head-cylinder':
      return ellipticalHeadCylinder(spec);
    default: {
      const kind = (spec as { kind?: unknown }).kind;
      throw new InputError(`unknown shape kind ${JSON.stringify(kind)}`, { field: 'shape.kind' });
    }
  }
}
