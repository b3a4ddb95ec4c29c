/**
 * The people behind one fit by name (the fit and test records hold user ids): who uploaded the
 * test, who asked for this fit, who reviewed it; the operator as stated at upload. The fit page
 * shows names, never ids.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Store } from '../../store/index.js';
import { READERS } from '../access.js';
import { idParams, protectedErrors } from '../schemas.js';

const fitPeople = z
  .object({
    operator: z.string().nullable().meta({ description: 'who ran the test, as stated at upload' }),
    uploadedBy: z
      .string()
      .nullable()
      .meta({ description: 'who uploaded the log (null: the system)' }),
    fittedBy: z
      .string()
      .nullable()
      .meta({ description: 'who asked for this fit (null: the system)' }),
    reviewedBy: z.string().nullable().meta({ description: 'who approved or rejected it' }),
  })
  .meta({ id: 'FitPeople' });

/** A user's name; a user since removed from the records still reads as someone. */
async function nameOf(store: Store, id: number | null): Promise<string | null> {
  if (id === null) return null;
  try {
    return (await store.users.get(id)).name;
  } catch {
    return `user ${id}`;
  }
}

export const fitPeopleRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/fits/:id/people',
    {
      config: { roles: READERS },
      schema: {
        tags: ['fits'],
        summary: 'Who ran, uploaded, fitted and reviewed a fit, by name',
        params: idParams,
        response: { 200: fitPeople, ...protectedErrors },
      },
    },
    async (request) => {
      const fit = await app.store.fits.get(request.params.id);
      const test = await app.store.tests.get(fit.testId);
      return {
        operator: test.operator,
        uploadedBy: await nameOf(app.store, test.createdBy),
        fittedBy: await nameOf(app.store, fit.createdBy),
        reviewedBy: fit.status === 'draft' ? null : await nameOf(app.store, fit.review?.by ?? null),
      };
    },
  );
};
