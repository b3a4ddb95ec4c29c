import { z } from 'zod';
import { nameText } from '../limits.js';

/**
 * A planned drain test, as a person states it (CLI flags, API body, workbench form): one shape,
 * imported by every shell. Levels are readings above the sensor's zero, as the logger shows them
 * (heights above the vessel's lowest interior point when the vessel file gives no sensor zero).
 */
export const QUANTITIES = ['effective-area', 'discharge-coefficient'] as const;
export type TargetQuantity = (typeof QUANTITIES)[number];

export const sensorPlanSchema = z.strictObject({
  /** Smallest step of the logged reading, m (1 mm → 0.001); 0 for none. */
  resolutionM: z.number().min(0).max(1).default(0),
  /** Standard deviation of the reading noise, m. */
  noiseM: z.number().min(0).max(1),
  sampleIntervalS: z.number().positive().max(3600),
  /** Lag-1 autocorrelation of the noise from one sample to the next (AR(1)); 0 for white. */
  noiseLag1: z.number().min(0).max(0.99).default(0),
});

export const statedInputSchema = z.strictObject({
  /** What it is, in words (e.g. "plan area from a taped diameter"). */
  name: nameText().min(1),
  /** Its relative standard uncertainty contribution to Cd·a (already times its sensitivity). */
  relativeStandardUncertainty: z.number().min(0).max(1),
});

export const planRequestSchema = z.strictObject({
  /** Expected Cd; without it the usual value for the outlet type is assumed (and said). */
  expectedCd: z.number().min(0.05).max(1.2).optional(),
  sensor: sensorPlanSchema,
  /** Level when the valve opens. Without it, a target must be given and the planner chooses. */
  startLevelM: z.number().positive().optional(),
  /** Level at which logging stops; without it, the level at which the fit's window ends. */
  endLevelM: z.number().optional(),
  /** Highest level the vessel may be filled to for the test (default: 95 % of its height). */
  maxStartLevelM: z.number().positive().optional(),
  target: z
    .strictObject({
      quantity: z.enum(QUANTITIES).default('effective-area'),
      relativeStandardUncertainty: z.number().positive().max(0.5),
    })
    .optional(),
  /** Seconds after the valve opens that the fit leaves out (the window chooser's shortest trim is 5 s). */
  openingTrimS: z.number().min(0).max(3600).default(5),
  statedInputs: z.array(statedInputSchema).max(20).default([]),
  /** The most the site may release to the drain, L/s (a permit's or the receiving sewer's limit). */
  dischargeLimitLS: z.number().positive().optional(),
  /** Levels to give the drain time to, m. */
  levelsM: z.array(z.number()).max(50).default([]),
});

export type PlanRequest = z.infer<typeof planRequestSchema>;
export type PlanRequestInput = z.input<typeof planRequestSchema>;
export type SensorPlan = z.infer<typeof sensorPlanSchema>;
