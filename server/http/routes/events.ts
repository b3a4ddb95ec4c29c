import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { noteText } from '../../core/limits.js';
import { InputError } from '../../core/errors.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_AND_AUDITORS, ENGINEERS_UP } from '../access.js';
import { idParams, pageOf, paging, problem, protectedErrors } from '../schemas.js';

const event = z
  .object({
    id: z.number().int(),
    vesselId: z.number().int(),
    outletId: z.number().int().nullable(),
    kind: z.enum(['cleaned', 'replaced', 'modified']),
    occurredAt: z.string(),
    notes: z.string().nullable(),
    createdBy: z.number().int().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'MaintenanceEvent' });

export const eventRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/vessels/:id/events',
    {
      config: { roles: ENGINEERS_UP },
      schema: {
        tags: ['maintenance'],
        summary: 'Record maintenance on an outlet (a new baseline for its trend)',
        params: idParams,
        body: z.object({
          outletId: z.number().int().positive().nullable().optional(),
          kind: z.enum(['cleaned', 'replaced', 'modified']),
          occurredAt: z.iso.date().or(z.iso.datetime({ offset: true })),
          notes: noteText().optional(),
        }),
        response: { 201: event, 422: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const v = await app.store.vessels.get(request.params.id);
      const outletId = request.body.outletId ?? null;
      if (outletId !== null && !v.outlets.some((o) => o.id === outletId)) {
        throw new InputError(`vessel ${v.id} has no outlet ${outletId}`, { field: 'outletId' });
      }
      reply.code(201);
      return await app.store.events.create(actorOf(request.user!), {
        vesselId: v.id,
        outletId,
        kind: request.body.kind,
        occurredAt: request.body.occurredAt,
        notes: request.body.notes,
      });
    },
  );

  app.get(
    '/api/vessels/:id/events',
    {
      config: { roles: ENGINEERS_AND_AUDITORS },
      schema: {
        tags: ['maintenance'],
        summary: "A vessel's maintenance events, in time order",
        params: idParams,
        querystring: paging,
        response: { 200: pageOf(event), ...protectedErrors },
      },
    },
    async (request) => {
      await app.store.vessels.get(request.params.id);
      return {
        ...(await app.store.events.listByVessel(
          request.params.id,
          request.query.limit,
          request.query.offset,
        )),
        ...request.query,
      };
    },
  );
};
