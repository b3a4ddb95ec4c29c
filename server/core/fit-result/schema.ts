/**
 * The fit result, one shape for every fit (after the example of lmfit's Parameters and
 * MinimizerResult): named parameters (value, free or fixed, bounds, standard uncertainty,
 * interval, start), the solver's record (why it stopped, iterations, evaluations, rank), residual
 * diagnostics, correlations by name, warnings, and an optional uncertainty budget. A single-vessel
 * fit adds Cd·a and Cd in GUM terms, the window and its diagnostics; a joint fit adds every outlet.
 *
 * These zod schemas are the one definition: the API validates and publishes them (OpenAPI), core's
 * FitJson is inferred from them, the web imports the types only. Objects are loose (members not
 * named here pass through), and members that fits stored by engine 0.1.0 lack are optional, so every
 * stored fit still reads back unchanged (stored results are never rewritten). JSON has no NaN:
 * numbers that can be undefined are nullable.
 */
import { z } from 'zod';

const num = z.number().nullable();
const interval = z.tuple([num, num]).nullable();

/** One parameter of a model, by name. */
export const fitParameter = z.looseObject({
  name: z.string(),
  unit: z.string(),
  free: z.boolean(),
  value: num,
  /** Null for a fixed parameter. */
  standardUncertainty: num,
  /** 95 % interval (Student-t at the fit's degrees of freedom), null for a fixed parameter. */
  ci95: interval.optional(),
  start: num.optional(),
  /** Box bounds the solver kept to; null ends are open. (Since engine 0.2.0.) */
  bounds: z.object({ lower: num, upper: num }).optional(),
  atBound: z.boolean().optional(),
});

/** Correlation matrix of the free parameters, rows and columns in the order of `parameters`. */
export const correlations = z.object({
  parameters: z.array(z.string()),
  matrix: z.array(z.array(num)),
});

/** What the least-squares solver did. */
export const solverRecord = z.looseObject({
  method: z.string(),
  stopReason: z.string(),
  converged: z.boolean(),
  iterations: z.number().int(),
  evaluations: z.number().int().optional(),
  jacobianEvaluations: z.number().int().optional(),
  rank: z.number().int().nullable().optional(),
  singularValues: z.array(num).optional(),
  sumSquares: num.optional(),
});

export const residualDiagnostics = z.looseObject({
  samples: z.number().int(),
  rmseM: num,
  maxAbsM: num,
  lag1Autocorrelation: num,
  durbinWatson: num,
});

export const fitWarning = z.looseObject({
  code: z.string(),
  message: z.string(),
  stage: z.string().optional(),
});

/** A result in GUM terms (JCGM 100:2008): value, standard uncertainty, coverage, interval. */
export const gumEstimate = z.looseObject({
  value: z.number(),
  standardUncertainty: num,
  ci95: interval,
  coverageFactor: num.optional(),
  expandedUncertainty: num.optional(),
  relativeStandardUncertainty: num.optional(),
  effectiveDegreesOfFreedom: num.optional(),
});

/**
 * The uncertainty budget as stored (server/core/budget builds it): the printed table (the same
 * strings in the CLI, the fit page and the PDF), the lines with their numbers, and the notes.
 */
export const budgetJson = z.looseObject({
  basis: z.string().optional(),
  lines: z.array(
    z.looseObject({
      key: z.string(),
      input: z.string(),
      standardUncertainty: num,
      contribution: num,
      share: num,
    }),
  ),
  table: z.looseObject({
    columns: z.array(z.string()),
    rows: z.array(z.array(z.string())),
    totals: z.array(z.tuple([z.string(), z.string()])),
  }),
  notes: z.array(z.string()),
});

/** The members every fit has. */
const fitCommon = {
  converged: z.boolean(),
  parameters: z.array(fitParameter),
  correlations,
  solver: solverRecord,
  warnings: z.array(fitWarning),
  /** The uncertainty budget (JCGM 100:2008), absent from fits stored before it existed. */
  budget: budgetJson.optional(),
};

const note = z.looseObject({ code: z.string(), message: z.string() });

/** One drain test of one vessel (`efflux fit --json`, stored with every fit). */
export const singleFitResult = z
  .looseObject({
    engineVersion: z.string(),
    ...fitCommon,
    dischargeCoefficient: gumEstimate.nullable(),
    effectiveAreaM2: gumEstimate,
    residuals: residualDiagnostics,
    window: z.looseObject({
      startS: z.number(),
      endS: z.number(),
      samples: z.number().int(),
      startTime: z.string().nullable().optional(),
      endTime: z.string().nullable().optional(),
      chosenBy: z.string().optional(),
      trims: z
        .array(z.looseObject({ what: z.string(), fromS: num, toS: num, reason: z.string() }))
        .optional(),
      notes: z.array(note).optional(),
    }),
    timing: z.looseObject({
      parseMs: z.number(),
      fitMs: z.number(),
      diagnosticsMs: z.number().optional(),
      budgetMs: z.number().optional(),
    }),
    modelComparison: z
      .looseObject({
        chosen: z.looseObject({
          model: z.string(),
          parameters: z.number().int(),
          sumSquares: num,
          aic: num,
        }),
        rows: z.array(
          z.looseObject({
            term: z.string(),
            change: z.string(),
            model: z.string(),
            parameters: z.number().int(),
            deltaAic: num,
            fTest: z.looseObject({ f: num, pValue: num }).nullable().optional(),
            converged: z.boolean().optional(),
          }),
        ),
        basis: z.string().optional(),
      })
      .nullable()
      .optional(),
    headBands: z
      .array(
        z.looseObject({
          headFromM: z.number(),
          headToM: z.number(),
          samples: z.number().int(),
          dischargeCoefficient: num,
          standardUncertainty: num,
        }),
      )
      .optional(),
    read: z
      .looseObject({
        t0: z.string().nullable(),
        samples: z.number().int(),
        columns: z.array(z.unknown()).optional(),
        notes: z.array(note).optional(),
      })
      .optional(),
    model: z
      .looseObject({ description: z.string().optional(), equation: z.string().optional() })
      .optional(),
    plot: z
      .object({
        log: z.object({ timeS: z.array(z.number()), levelM: z.array(num) }),
        window: z.object({
          offsetS: z.number(),
          timeS: z.array(z.number()),
          observedM: z.array(num),
          fittedM: z.array(num),
        }),
      })
      .optional(),
  })
  .meta({
    id: 'FitResult',
    description:
      'A single-vessel fit (one drain test), as stored and as `efflux fit --json` prints it',
  });

/** The joint fit of connected vessels (`efflux fit-system --json`). */
export const jointFitResult = z
  .looseObject({
    format: z.literal('efflux-system-fit'),
    version: z.number().int(),
    engineVersion: z.string(),
    ...fitCommon,
    outlets: z.record(
      z.string(),
      z.looseObject({ effectiveAreaM2: gumEstimate, dischargeCoefficient: gumEstimate.nullable() }),
    ),
    /** Per log: its samples, noise, AR(1) factor. */
    residuals: z.array(residualDiagnostics.extend({ id: z.string(), fileName: z.string() })),
    covariance: z.array(z.array(num)),
    theta: z.array(z.number()),
    free: z.array(z.number().int()),
    degreesOfFreedom: z.number(),
    coverageFactor: z.number(),
  })
  .meta({ id: 'SystemFitResult', description: 'A joint fit of connected vessels' });

export type FitParameter = z.infer<typeof fitParameter>;
export type FitCorrelations = z.infer<typeof correlations>;
export type SolverRecord = z.infer<typeof solverRecord>;
export type SingleFitResult = z.infer<typeof singleFitResult>;
export type JointFitResult = z.infer<typeof jointFitResult>;
