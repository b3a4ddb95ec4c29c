/**
 * Response and request shapes shared by the route modules. Handlers return the store's objects;
 * the zod serializer checks them against these before they leave.
 */
import { z } from 'zod';
import { singleFitResult } from '../core/fit-result/schema.js';
import type { Outlet, Vessel } from '../core/stored-vessel.js';
import { nameText, tagText } from '../core/limits.js';

export const idParams = z.object({ id: z.coerce.number().int().positive() });

export const paging = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});

export const pageOf = <T extends z.ZodType>(item: T) =>
  z.object({
    items: z.array(item),
    total: z.number().int(),
    limit: z.number().int(),
    offset: z.number().int(),
  });

const json = z.record(z.string(), z.unknown());

export const problem = z
  .object({
    type: z.string(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string().optional(),
    instance: z.string().optional(),
    file: z.string().optional(),
    line: z.number().int().optional(),
    field: z.string().optional(),
    errors: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
    existingTestId: z.number().int().optional(),
  })
  .meta({ id: 'Problem', description: 'RFC 9457 problem details' });

export const outlet = z
  .object({
    id: z.number().int(),
    key: z.string(),
    type: z.string().nullable(),
    boreM: z.number().nullable(),
    boreToleranceM: z.number().nullable(),
    elevationM: z.number().nullable(),
    actionThreshold: z.number().nullable(),
    spec: json,
    retiredAt: z.string().nullable(),
  })
  .meta({ id: 'Outlet' }) satisfies z.ZodType<Outlet>; // the one Outlet shape (core/stored-vessel.ts)

export const vessel = z
  .object({
    id: z.number().int(),
    site: z.string(),
    name: z.string(),
    revision: z.number().int(),
    spec: json,
    outlets: z.array(outlet),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'Vessel' }) satisfies z.ZodType<Vessel>; // the one Vessel shape (core/stored-vessel.ts)

const rawRef = z.object({ sha256: z.string(), fileName: z.string(), size: z.number().int() });

export const drainTest = z
  .object({
    id: z.number().int(),
    vesselId: z.number().int(),
    outletId: z.number().int().nullable(),
    status: z.enum(['pending', 'analysed']),
    sha256: z.string(),
    fileName: z.string(),
    size: z.number().int(),
    baro: rawRef.nullable(),
    settings: json,
    detected: json.nullable(),
    operator: z.string().nullable(),
    loggerId: z.string().nullable(),
    testedAt: z.string().nullable().meta({
      description:
        "THE date of the test (UTC ISO 8601): stated, or the fitted window's first reading on the log's clock",
    }),
    testedAtSource: z.enum(['stated', 'log']).nullable(),
    notes: z.string().nullable(),
    createdBy: z.number().int().nullable(),
    createdAt: z.string(),
    failedAttempts: z.number().int().meta({
      description:
        'analyses that failed for a reason other than the input (timeout, fault, full disk)',
    }),
    lastFailure: z.string().nullable(),
    stuck: z.boolean().meta({
      description: 'pending and failed 3 times: not retried at start; retry or withdraw it',
    }),
  })
  .meta({ id: 'DrainTest' });

export const fit = z
  .object({
    id: z.number().int(),
    testId: z.number().int(),
    vesselId: z.number().int(),
    outletId: z.number().int().nullable(),
    settings: json,
    vessel: json,
    result: singleFitResult,
    engineVersion: z.string(),
    status: z.enum(['draft', 'approved', 'rejected']),
    supersededBy: z.number().int().nullable(),
    review: z
      .object({
        comment: z.string().nullable(),
        by: z.number().int().nullable(),
        at: z.string().nullable(),
        selfReview: z.boolean().meta({
          description: 'approved by the uploader or refit requester (site allows self-review)',
        }),
      })
      .nullable(),
    createdBy: z.number().int().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'Fit' });

/** The settings a person can state (AnalysisSettings), as JSON. */
export const analysisSettings = z
  .object({
    timeColumn: nameText().min(1),
    levelColumn: nameText().min(1),
    unit: tagText().min(1),
    quantity: z.enum(['level', 'gauge-pressure', 'absolute-pressure', 'distance-from-top']),
    dateOrder: z.enum(['dmy', 'mdy', 'ymd']),
    tz: tagText().min(1),
    tzSource: z.enum(['site']).meta({
      description: "tz was not stated: the vessel's site's time zone was used",
    }),
    delimiter: z.string().min(1).max(3),
    decimal: z.enum(['.', ',']),
    levelTag: tagText().min(1),
    baroTag: tagText().min(1),
    sheet: tagText().min(1),
    window: tagText().min(1),
    fitInflow: z.boolean(),
    fitDatum: z.boolean(),
    fitExponent: z.boolean(),
  })
  .partial()
  .strict()
  .meta({ id: 'AnalysisSettings' });

/** Error answers every protected route can give, for the OpenAPI document. */
export const protectedErrors = { 400: problem, 401: problem, 403: problem, 404: problem } as const;
