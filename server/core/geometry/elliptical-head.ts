import type { VesselShape } from './shape.js';
import { clampHeight, heightOrOpen, positive } from './check.js';

/**
 * A vertical cylinder on a 2:1 elliptical bottom head: a half-ellipsoid of revolution with
 * radius R = D/2 and depth b = D/4. At height y in the head, (r/R)² + ((b − y)/b)² = 1, so
 * A = π·(R/b)²·(2·b·y − y²) and V = π·(R/b)²·(b·y² − y³/3); at y = b that is (2/3)·π·R²·b,
 * half the ellipsoid. Above the head the cylinder adds π·R² per metre.
 */
export function ellipticalHeadCylinder(spec: { diameterM: number; heightM?: number }): VesselShape {
  const d = positive(spec.diameterM, 'diameterM');
  const r = d / 2;
  const b = d / 4;
  const heightM = heightOrOpen(spec.heightM, b, 'the head depth D/4');
  const full = Math.PI * r * r;
  const k = full / (b * b);
  const headVolume = (2 / 3) * full * b;
  return {
    kind: 'elliptical-head-cylinder',
    heightM,
    constantArea: false,
    areaM2(y) {
      const h = clampHeight(y, heightM);
      return h >= b ? full : k * h * (2 * b - h);
    },
    volumeM3(y) {
      const h = clampHeight(y, heightM);
      return h >= b ? headVolume + full * (h - b) : k * h * h * (b - h / 3);
    },
  };
}
