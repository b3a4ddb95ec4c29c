/**
 * Tests of one outlet side by side (issue 19 scope 5): GET /api/outlets/:id/compare?tests=3,5,…
 * answers core/compare/side-by-side.ts for each test's fit in force (the approved one not
 * superseded, else its latest fit), so the page draws readings against head with each fitted
 * curve and prints Cd·a, Cd, U and every pair's E_n. Reads only; computed on this thread (a few
 * thousand numbers).
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { sideBySide, type SideBySideFit } from '../../core/compare/side-by-side.js';
import type { StoredFit } from '../../store/fits.js';
import { READERS } from '../access.js';
import { HttpProblem } from '../problems.js';
import { idParams, problem, protectedErrors } from '../schemas.js';

/** At most this many tests at once: every pair is compared (28 pairs for 8). */
const MOST_TESTS = 8;

const estimate = z.object({ value: z.number(), expandedUncertainty: z.number() }).nullable();
const enComparison = z
  .object({
    difference: z.number(),
    expandedUncertaintyOfDifference: z.number(),
    en: z.number(),
    agree: z.boolean(),
  })
  .nullable();

const comparison = z
  .object({
    outlet: z.object({ id: z.number().int(), key: z.string(), vesselId: z.number().int() }),
    referenceHeadM: z.number().nullable(),
    tests: z.array(
      z.object({
        label: z.string(),
        testId: z.number().int(),
        fitId: z.number().int(),
        fitStatus: z.string(),
        testedAt: z.string().nullable(),
        effectiveAreaM2: estimate,
        dischargeCoefficient: estimate,
        headOffsetM: z.number().nullable(),
        curve: z
          .object({
            headM: z.array(z.number()),
            elapsedS: z.array(z.number()),
            fittedHeadM: z.array(z.number()),
          })
          .nullable(),
      }),
    ),
    pairs: z.array(
      z.object({
        first: z.string(),
        second: z.string(),
        effectiveArea: enComparison,
        dischargeCoefficient: enComparison,
      }),
    ),
    notes: z.array(z.string()),
  })
  .meta({ id: 'TestComparison' });

/** The fit a test stands for: approved and in force, else the newest not superseded, else the newest. */
function fitInForce(fits: readonly StoredFit[]): StoredFit | null {
  const live = fits.filter((f) => f.supersededBy === null);
  return (
    live.find((f) => f.status === 'approved') ??
    live[live.length - 1] ??
    fits[fits.length - 1] ??
    null
  );
}

export const compareRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/outlets/:id/compare',
    {
      config: { roles: READERS },
      schema: {
        tags: ['fits'],
        summary:
          "Two or more tests of an outlet side by side: readings against head with each fitted curve, Cd·a and Cd with expanded uncertainties, each pair's difference and E_n",
        description:
          'tests: test ids separated by commas (2 to 8), each a test of this outlet. Each test is represented by its fit in force (approved and not superseded, else its latest). ' +
          'E_n = (x₁ − x₂) / √(U₁² + U₂²) (ISO/IEC 17043 Annex B); |E_n| ≤ 1: the two agree.',
        params: idParams,
        querystring: z.object({
          tests: z
            .string()
            .max(200)
            .regex(/^\d{1,12}(,\d{1,12})*$/, 'test ids separated by commas, e.g. 3,5'),
        }),
        response: { 200: comparison, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const outlet = await app.store.vessels.outlet(request.params.id);
      const ids = [...new Set(request.query.tests.split(',').map(Number))];
      if (ids.length < 2 || ids.length > MOST_TESTS)
        throw new HttpProblem(
          422,
          'validation',
          `tests: name 2 to ${MOST_TESTS} different tests of outlet ${outlet.key}, not ${ids.length}`,
          { field: 'tests' },
        );
      const chosen: SideBySideFit[] = [];
      for (const testId of ids) {
        const fits = await app.store.fits.listByTest(testId);
        const f = fitInForce(fits);
        // the same answer for a test of another outlet and for no such test: nothing leaks across sites
        if (!f || f.outletId !== outlet.id || f.vesselId !== outlet.vesselId)
          throw new HttpProblem(
            422,
            'validation',
            `tests: ${testId} is not a fitted test of outlet ${outlet.key}`,
            { field: 'tests' },
          );
        const test = await app.store.tests.get(testId);
        chosen.push({
          testId,
          fitId: f.id,
          fitStatus: f.status,
          testedAt: test.testedAt,
          result: f.result as Record<string, unknown>,
        });
      }
      return {
        outlet: { id: outlet.id, key: outlet.key, vesselId: outlet.vesselId },
        ...sideBySide(chosen),
      };
    },
  );
};
