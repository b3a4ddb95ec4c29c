/**
 * The full parameter vector of a drain model, θ, in a fixed order. A fit frees a subset.
 * Readings are in the sensor's frame: y = η − z_s, where η is the surface elevation above the
 * vessel's lowest interior point and z_s the elevation of the sensor's zero.
 */
export const THETA = {
  /** Cd·a, m². */
  effectiveArea: 0,
  /** Level reading at the window's start (t = 0), m. */
  initialReading: 1,
  /** Elevation of the sensor's zero above the vessel bottom, m (the datum). */
  sensorZero: 2,
  /** Constant unknown inflow, m³/s. */
  inflow: 3,
  /** Head exponent n. */
  exponent: 4,
} as const;

export const THETA_SIZE = 5;

export const THETA_NAMES = [
  'effectiveAreaM2',
  'initialReadingM',
  'sensorZeroElevationM',
  'inflowM3S',
  'headExponent',
] as const;

export type ThetaName = (typeof THETA_NAMES)[number];

/** What the vessel contributes to the model (everything that is not fitted). */
export interface DrainSetting {
  shape: import('../geometry/shape.js').VesselShape;
  /** Outlet centreline elevation above the lowest interior point, m. */
  outletElevationM: number;
  gravity: number;
}
