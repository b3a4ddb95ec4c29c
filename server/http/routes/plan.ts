/**
 * Planning a drain test over HTTP: the same pure planner as `efflux plan` (server/core/plan), on a
 * stored vessel narrowed to one outlet. Nothing is stored; it computes in a few milliseconds for
 * a constant-area vessel (an ODE shape's recommendation search is tens of ms), on the event loop.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { planDrainTest, planRequestSchema } from '../../core/plan/index.js';
import { validateVessel } from '../../core/vessel/schema.js';
import { chooseOutlet, vesselForAnalysis } from '../../jobs/ingest.js';
import { READERS } from '../access.js';
import { idParams, problem, protectedErrors } from '../schemas.js';

const planBody = planRequestSchema.extend({ outletId: z.number().int().positive().optional() });

const planAnswer = z
  .looseObject({
    vessel: z.object({ name: z.string(), site: z.string().nullable() }),
    assumptions: z.record(z.string(), z.unknown()),
    test: z.record(z.string(), z.unknown()).nullable(),
    target: z.record(z.string(), z.unknown()).nullable(),
    recommendation: z.record(z.string(), z.unknown()).nullable(),
    discharge: z.record(z.string(), z.unknown()),
    cautions: z.array(z.string()),
    notes: z.array(z.string()),
  })
  .meta({ id: 'DrainTestPlan', description: 'The output of `efflux plan --json`' });

export const planRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/vessels/:id/plan',
    {
      config: { roles: READERS, scope: 'vessel' },
      schema: {
        tags: ['plan'],
        summary:
          'Plan a drain test: drain time, volume, peak outflow, expected u of Cd·a and Cd, the least test for a target',
        params: idParams,
        body: planBody,
        response: { 200: planAnswer, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const vessel = await app.store.vessels.get(request.params.id);
      const { outletId, ...req } = request.body;
      const spec = validateVessel(vesselForAnalysis(vessel, chooseOutlet(vessel, outletId)));
      return planDrainTest(spec, req) as unknown as z.infer<typeof planAnswer>;
    },
  );
};
