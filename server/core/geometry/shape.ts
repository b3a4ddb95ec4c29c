/**
 * A vessel's interior described by its plan area against liquid height.
 * y is the liquid height in metres above the vessel's lowest interior point.
 * Implementations are pure and allocation-free in areaM2/volumeM3 (they sit in the ODE's inner loop).
 */
export interface VesselShape {
  readonly kind: string;
  /** Interior height in m; Infinity when the shape has no top (e.g. an open-topped prism). */
  readonly heightM: number;
  /** True when areaM2 does not depend on y (enables the closed-form drain solution). */
  readonly constantArea: boolean;
  /** Plan (free-surface) area at height y, m². */
  areaM2(y: number): number;
  /** Liquid volume from the bottom to height y, m³. */
  volumeM3(y: number): number;
}
