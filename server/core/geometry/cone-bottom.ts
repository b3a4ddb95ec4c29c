import type { VesselShape } from './shape.js';
import { clampHeight, heightOrOpen, positive } from './check.js';

/**
 * A hopper: an apex-down cone of height hc and top radius R, with a cylinder of the same
 * radius above it. In the cone the radius grows linearly, r = R·y/hc, so A = π·(R·y/hc)² and
 * V = π·R²·y³/(3·hc²); above it the cylinder adds π·R² per metre.
 */
export function coneBottom(spec: {
  diameterM: number;
  coneHeightM: number;
  heightM?: number;
}): VesselShape {
  const d = positive(spec.diameterM, 'diameterM');
  const hc = positive(spec.coneHeightM, 'coneHeightM');
  const heightM = heightOrOpen(spec.heightM, hc, 'the cone height');
  const r = d / 2;
  const full = Math.PI * r * r;
  const coneVolume = (full * hc) / 3;
  return {
    kind: 'cone-bottom',
    heightM,
    constantArea: false,
    areaM2(y) {
      const h = clampHeight(y, heightM);
      if (h >= hc) return full;
      const s = h / hc;
      return full * s * s;
    },
    volumeM3(y) {
      const h = clampHeight(y, heightM);
      if (h >= hc) return coneVolume + full * (h - hc);
      const s = h / hc;
      return coneVolume * s * s * s;
    },
  };
}
