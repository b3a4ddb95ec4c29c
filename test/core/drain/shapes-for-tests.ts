import type { VesselShape } from '../../../server/core/geometry/shape.js';

/**
 * Plan areas written straight from ordinary geometry, independent of server/core/geometry,
 * so the drain tests do not lean on the code under test elsewhere.
 */
export function cylinder(diameter: number, height = 10): VesselShape {
  const a = (Math.PI * diameter * diameter) / 4;
  return {
    kind: 'cyl',
    heightM: height,
    constantArea: true,
    areaM2: () => a,
    volumeM3: (y) => a * y,
  };
}

/** Apex-down cone, apex at y = 0, radius R at height hc. */
export function cone(radius: number, coneHeight: number): VesselShape {
  const alpha = Math.PI * (radius / coneHeight) ** 2;
  return {
    kind: 'cone',
    heightM: coneHeight,
    constantArea: false,
    areaM2: (y) => alpha * y * y,
    volumeM3: (y) => (alpha * y ** 3) / 3,
  };
}

export function sphere(diameter: number): VesselShape {
  return {
    kind: 'sphere',
    heightM: diameter,
    constantArea: false,
    areaM2: (y) => Math.PI * (diameter * y - y * y),
    volumeM3: (y) => (Math.PI * y * y * (1.5 * diameter - y)) / 3,
  };
}

export function horizontalCylinder(diameter: number, length: number): VesselShape {
  return {
    kind: 'hcyl',
    heightM: diameter,
    constantArea: false,
    areaM2: (y) => 2 * length * Math.sqrt(Math.max(y * (diameter - y), 0)),
    volumeM3: () => NaN,
  };
}
