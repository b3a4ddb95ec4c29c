import type { VesselShape } from './shape.js';
import { clampHeight, heightOrOpen, positive } from './check.js';

/** Any vessel with vertical walls: area A at every height, V = A·y. */
function prism(kind: string, areaM2: number, heightM: number): VesselShape {
  return {
    kind,
    heightM,
    constantArea: true,
    areaM2: () => areaM2,
    volumeM3: (y) => areaM2 * clampHeight(y, heightM),
  };
}

export function verticalCylinder(spec: { diameterM: number; heightM?: number }): VesselShape {
  const d = positive(spec.diameterM, 'diameterM');
  return prism('vertical-cylinder', (Math.PI * d * d) / 4, heightOrOpen(spec.heightM, 0, 'zero'));
}

export function rectangular(spec: {
  lengthM: number;
  widthM: number;
  heightM?: number;
}): VesselShape {
  const l = positive(spec.lengthM, 'lengthM');
  const w = positive(spec.widthM, 'widthM');
  return prism('rectangular', l * w, heightOrOpen(spec.heightM, 0, 'zero'));
}
