/**
 * Pending tests: analysed again on request, or withdrawn. A test stays pending when its analysis
 * timed out, its worker failed or the disk was full; these routes are how a person ends that.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { noteText } from '../../core/limits.js';
import { retryPending, withdrawPending } from '../../jobs/ingest.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, TECHNICIANS_UP } from '../access.js';
import { drainTest, fit, idParams, problem, protectedErrors } from '../schemas.js';

export const pendingRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/tests/:id/retry',
    {
      config: { roles: TECHNICIANS_UP },
      schema: {
        tags: ['tests'],
        summary:
          'Analyse a pending test again (after a timeout, a fault or a full disk); its first fit is stored as a draft',
        params: idParams,
        response: {
          201: z.object({ test: drainTest, fit }),
          409: problem,
          422: problem,
          503: problem,
          507: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const out = await retryPending(
        app.store,
        app.analyze,
        actorOf(request.user!),
        request.params.id,
      );
      reply.code(201);
      return { test: await app.store.tests.get(request.params.id), fit: out };
    },
  );

  app.post(
    '/api/tests/:id/withdraw',
    {
      config: { roles: ENGINEERS_UP },
      schema: {
        tags: ['tests'],
        summary:
          'Withdraw a pending test: its row and unshared raw bytes are deleted; the audit log keeps the upload and the reason',
        params: idParams,
        body: z.object({ reason: noteText().trim().min(1, 'must say why') }).strict(),
        response: {
          200: z.object({ withdrawn: z.number().int() }),
          409: problem,
          507: problem,
          ...protectedErrors,
        },
      },
    },
    async (request) => {
      await withdrawPending(
        app.store,
        actorOf(request.user!),
        request.params.id,
        request.body.reason,
      );
      return { withdrawn: request.params.id };
    },
  );
};
