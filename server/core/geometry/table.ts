import { InputError } from '../errors.js';
import type { VesselShape } from './shape.js';

/**
 * A stage–area table from a survey (ponds, sumps, irregular tanks). Area is linear between
 * points, so the volume of each segment is exact: a·Δy + s·Δy²/2 with s the segment's slope.
 *
 * Outside the table the area is held: below the first point at the first area (the part under
 * the lowest surveyed stage is taken as vertical-walled), and the vessel ends at the last point
 * (heightM), above which, like every shape, it is full. A table whose survey does not reach the
 * top should be extended by its author rather than guessed at here.
 */
export function stageAreaTable(spec: { points: Array<[number, number]> }): VesselShape {
  const pts = spec.points;
  if (!Array.isArray(pts) || pts.length < 2) {
    throw new InputError('a stage–area table needs at least 2 points', { field: 'shape.points' });
  }
  const n = pts.length;
  const hs = new Float64Array(n);
  const as = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const p = pts[i];
    const field = `shape.points.${i}`;
    if (!Array.isArray(p) || p.length !== 2) {
      throw new InputError('each point must be [heightM, areaM2]', { field });
    }
    const [h, a] = p;
    if (typeof h !== 'number' || !Number.isFinite(h) || h < 0) {
      throw new InputError(`height must be a number ≥ 0 (got ${String(h)})`, {
        field: `${field}.0`,
      });
    }
    if (typeof a !== 'number' || !Number.isFinite(a) || a <= 0) {
      throw new InputError(`area must be a positive number (got ${String(a)})`, {
        field: `${field}.1`,
      });
    }
    if (i > 0 && h <= hs[i - 1]) {
      throw new InputError(`heights must increase strictly (got ${h} after ${hs[i - 1]})`, {
        field: `${field}.0`,
      });
    }
    hs[i] = h;
    as[i] = a;
  }

  // cum[i] = volume up to hs[i]; the first entry is the held-area prism below the first point.
  const cum = new Float64Array(n);
  cum[0] = as[0] * hs[0];
  for (let i = 1; i < n; i++) cum[i] = cum[i - 1] + ((as[i - 1] + as[i]) / 2) * (hs[i] - hs[i - 1]);

  const top = hs[n - 1];
  let constant = true;
  for (let i = 1; i < n; i++) if (as[i] !== as[0]) constant = false;

  /** Index i of the segment [hs[i], hs[i+1]] holding y (hs[0] ≤ y ≤ top); binary search. */
  function segment(y: number): number {
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (hs[mid] <= y) lo = mid;
      else hi = mid;
    }
    return lo;
  }

  return {
    kind: 'table',
    heightM: top,
    constantArea: constant,
    areaM2(y) {
      if (!(y > hs[0])) return as[0];
      if (y >= top) return as[n - 1];
      const i = segment(y);
      return as[i] + ((as[i + 1] - as[i]) * (y - hs[i])) / (hs[i + 1] - hs[i]);
    },
    volumeM3(y) {
      if (!(y > 0)) return 0;
      if (y <= hs[0]) return as[0] * y;
      if (y >= top) return cum[n - 1];
      const i = segment(y);
      const dy = y - hs[i];
      const slope = (as[i + 1] - as[i]) / (hs[i + 1] - hs[i]);
      return cum[i] + as[i] * dy + (slope * dy * dy) / 2;
    },
  };
}
