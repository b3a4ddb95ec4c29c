import type { VesselShape } from './shape.js';
import { clampHeight, positive } from './check.js';

/**
 * A cylinder lying on its side, liquid depth y in 0..D. The free surface is a chord of width
 * 2·sqrt(y·(D − y)) along the full length; the volume is the circular segment times the length,
 * V = L·[R²·acos((R − y)/R) − (R − y)·sqrt(2Ry − y²)].
 *
 * Written that way it cancels catastrophically near empty and near full (a negative volume at
 * a micrometre of depth), so it is evaluated as L·R²·(θ − sin θ)/2 with the central angle
 * θ = 4·asin(sqrt(y/D)), a series for θ − sin θ at small θ, and V(y) = V(D) − V(D − y) above
 * half full.
 */
function thetaMinusSin(x: number): number {
  if (x > 0.25) return x - Math.sin(x);
  // x³/3! − x⁵/5! + x⁷/7! − …, truncated where the next term is below 1e-18 of the first.
  const x2 = x * x;
  return (
    ((x * x2) / 6) *
    (1 - (x2 / 20) * (1 - (x2 / 42) * (1 - (x2 / 72) * (1 - (x2 / 110) * (1 - x2 / 156)))))
  );
}

export function horizontalCylinder(spec: { diameterM: number; lengthM: number }): VesselShape {
  const d = positive(spec.diameterM, 'diameterM');
  const l = positive(spec.lengthM, 'lengthM');
  const r = d / 2;
  const full = Math.PI * r * r * l;
  const lowerSegment = (h: number) =>
    0.5 * l * r * r * thetaMinusSin(4 * Math.asin(Math.sqrt(h / d)));
  return {
    kind: 'horizontal-cylinder',
    heightM: d,
    constantArea: false,
    areaM2(y) {
      const h = clampHeight(y, d);
      return 2 * l * Math.sqrt(h * (d - h));
    },
    volumeM3(y) {
      const h = clampHeight(y, d);
      return h <= r ? lowerSegment(h) : full - lowerSegment(d - h);
    },
  };
}
