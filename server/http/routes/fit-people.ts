/**
 * Who did what to a fit, by name (issue 19 scope 7): the fit and test JSON carry person ids
 * (createdBy, review.by), which an auditor cannot read; GET /api/fits/:id/people answers the names,
 * as the fit report PDF prints them. Any role may read it: a name is already on the PDF.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Store } from '../../store/index.js';
import { READERS } from '../access.js';
import { idParams, protectedErrors } from '../schemas.js';

const someone = z.object({ id: z.number().int().nullable(), name: z.string() }).nullable();

/** A person's name; an id no longer on record is still named as one ("person 7"). */
async function nameOf(store: Store, id: number | null) {
  if (id === null) return { id: null, name: 'the system' };
  try {
    return { id, name: (await store.users.get(id)).name };
  } catch {
    return { id, name: `person ${id}` };
  }
}

export const fitPeopleRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/fits/:id/people',
    {
      config: { roles: READERS },
      schema: {
        tags: ['fits'],
        summary:
          "The names of the fit's test uploader, the person who asked for the fit, and its reviewer",
        params: idParams,
        response: {
          200: z
            .object({
              uploadedBy: someone,
              fittedBy: someone,
              reviewedBy: someone.meta({ description: 'null while the fit waits for review' }),
            })
            .meta({ id: 'FitPeople' }),
          ...protectedErrors,
        },
      },
    },
    async (request) => {
      const fit = await app.store.fits.get(request.params.id);
      const test = await app.store.tests.get(fit.testId);
      return {
        uploadedBy: await nameOf(app.store, test.createdBy),
        fittedBy: await nameOf(app.store, fit.createdBy),
        reviewedBy:
          fit.review?.at && fit.status !== 'draft' ? await nameOf(app.store, fit.review.by) : null,
      };
    },
  );
};
