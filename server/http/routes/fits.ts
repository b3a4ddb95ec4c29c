import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { noteText } from '../../core/limits.js';
import { refit } from '../../jobs/ingest.js';
import { reviewFit } from '../../jobs/review.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS, TECHNICIANS_UP } from '../access.js';
import { sendReadyText } from '../ready-text.js';
import {
  analysisSettings,
  fit,
  idParams,
  pageOf,
  paging,
  problem,
  protectedErrors,
} from '../schemas.js';

export const fitRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/vessels/:id/fits',
    {
      config: { roles: READERS },
      schema: {
        tags: ['fits'],
        summary: "A vessel's fits, newest first",
        params: idParams,
        querystring: paging,
        response: { 200: pageOf(fit), ...protectedErrors },
      },
    },
    async (request) => {
      await app.store.vessels.get(request.params.id);
      return {
        ...(await app.store.fits.listByVessel(
          request.params.id,
          request.query.limit,
          request.query.offset,
        )),
        ...request.query,
      };
    },
  );

  app.get(
    '/api/fits/:id',
    {
      config: { roles: READERS },
      schema: {
        tags: ['fits'],
        summary: 'One fit',
        params: idParams,
        response: { 200: fit, ...protectedErrors },
      },
    },
    // Stored JSON bytes sent as is (same shape as the schema; checked by the store's tests), with an ETag.
    async (request, reply) =>
      sendReadyText(request, reply, await app.store.fits.getText(request.params.id)),
  );

  app.post(
    '/api/fits/:id/refit',
    {
      config: { roles: TECHNICIANS_UP },
      schema: {
        tags: ['fits'],
        summary:
          'Fit the same raw file again with changed settings (merged over the old); the old fit is superseded, kept',
        params: idParams,
        body: z.object({ settings: analysisSettings }),
        response: { 201: fit, 409: problem, 422: problem, 503: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const created = await refit(
        app.store,
        app.analyze,
        actorOf(request.user!),
        request.params.id,
        request.body.settings,
      );
      reply.code(201);
      return created;
    },
  );

  app.post(
    '/api/fits/:id/review',
    {
      config: { roles: ENGINEERS_UP },
      schema: {
        tags: ['fits'],
        summary: 'Approve or reject a draft fit, with a comment',
        params: idParams,
        body: z.object({ decision: z.enum(['approve', 'reject']), comment: noteText().optional() }),
        response: { 200: fit, 409: problem, ...protectedErrors },
      },
    },
    // An approval may change the outlet's trend status: recorded with it, webhooks told after commit.
    async (request) =>
      (
        await reviewFit(
          app.store,
          app.notifier,
          actorOf(request.user!),
          request.params.id,
          request.body.decision === 'approve' ? 'approved' : 'rejected',
          request.body.comment ?? null,
          app.clockMs(),
        )
      ).fit,
  );
};
