import { isInputError } from '../errors.js';
import { makeShape } from '../geometry/index.js';
import type { ShapeSpec } from '../geometry/spec.js';

/** A problem found by looking at fields together. */
export interface CrossFieldProblem {
  path: Array<string | number>;
  message: string;
}

interface Parsed {
  shape: ShapeSpec;
  outlet: { boreM: number; boreToleranceM?: number; elevationM: number };
  sensor?: { mountElevationM?: number };
  gravityMS2?: number;
}

/** The narrowest horizontal span of the vessel, m: an outlet bore must be smaller. */
function narrowestSpanM(shape: ShapeSpec): number {
  switch (shape.kind) {
    case 'rectangular':
      return Math.min(shape.lengthM, shape.widthM);
    case 'horizontal-cylinder':
      return Math.min(shape.diameterM, shape.lengthM);
    case 'table': {
      // The diameter of a circle with the table's largest area.
      let a = 0;
      for (const p of shape.points) a = Math.max(a, p[1]);
      return Math.sqrt((4 * a) / Math.PI);
    }
    default:
      return shape.diameterM;
  }
}

// Local gravity at the Earth's surface runs from about 9.78 (equator) to 9.83 m/s² (poles),
// common practice; outside this band the value is far more likely a typo or ft/s².
const G_MIN = 9.7;
const G_MAX = 9.9;

function toPath(field: string): Array<string | number> {
  return field.split('.').map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

export function crossFieldProblems(v: Parsed): CrossFieldProblem[] {
  const out: CrossFieldProblem[] = [];
  let heightM = Number.POSITIVE_INFINITY;
  try {
    heightM = makeShape(v.shape).heightM;
  } catch (e) {
    if (!isInputError(e)) throw e;
    out.push({ path: toPath(e.field ?? 'shape'), message: e.message });
    return out;
  }
  const { outlet } = v;
  if (
    v.shape.kind === 'table' &&
    v.shape.pointTolerances &&
    v.shape.pointTolerances.length !== v.shape.points.length
  ) {
    out.push({
      path: ['shape', 'pointTolerances'],
      message: `must give one [heightM, areaM2] tolerance pair per point (${v.shape.points.length}) (got ${v.shape.pointTolerances.length})`,
    });
  }
  if (Number.isFinite(heightM) && outlet.elevationM >= heightM) {
    out.push({
      path: ['outlet', 'elevationM'],
      message: `must be below the top of the vessel (${heightM} m) (got ${outlet.elevationM})`,
    });
  }
  const span = narrowestSpanM(v.shape);
  if (outlet.boreM >= span) {
    out.push({
      path: ['outlet', 'boreM'],
      message: `must be smaller than the vessel (narrowest span ${Number(span.toPrecision(6))} m) (got ${outlet.boreM})`,
    });
  }
  if (outlet.boreToleranceM !== undefined && outlet.boreToleranceM >= outlet.boreM) {
    out.push({
      path: ['outlet', 'boreToleranceM'],
      message: `must be smaller than the bore (${outlet.boreM} m) (got ${outlet.boreToleranceM})`,
    });
  }
  const mount = v.sensor?.mountElevationM;
  if (mount !== undefined && mount <= outlet.elevationM) {
    out.push({
      path: ['sensor', 'mountElevationM'],
      message: `a top-mounted gauge must sit above the outlet (${outlet.elevationM} m) (got ${mount})`,
    });
  }
  if (v.gravityMS2 !== undefined && (v.gravityMS2 < G_MIN || v.gravityMS2 > G_MAX)) {
    out.push({
      path: ['gravityMS2'],
      message: `must be a local gravity in m/s² between ${G_MIN} and ${G_MAX} (got ${v.gravityMS2})`,
    });
  }
  return out;
}
