import type { VesselShape } from './shape.js';
import { clampHeight, positive } from './check.js';

/**
 * A sphere filled to depth y: surface A = π·(D·y − y²), spherical cap V = π·y²·(3R − y)/3.
 * Above half full the volume is the whole sphere less the empty cap at the top, so that near
 * full (where A → 0) rounding cannot make V step backwards.
 */
export function sphere(spec: { diameterM: number }): VesselShape {
  const d = positive(spec.diameterM, 'diameterM');
  const r = d / 2;
  const cap = (h: number) => (Math.PI * h * h * (3 * r - h)) / 3;
  const whole = (Math.PI * d * d * d) / 6;
  return {
    kind: 'sphere',
    heightM: d,
    constantArea: false,
    areaM2(y) {
      const h = clampHeight(y, d);
      return Math.PI * h * (d - h);
    },
    volumeM3(y) {
      const h = clampHeight(y, d);
      return h <= r ? cap(h) : whole - cap(d - h);
    },
  };
}
