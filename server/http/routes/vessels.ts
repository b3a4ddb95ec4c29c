import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS } from '../access.js';
import { idParams, pageOf, paging, problem, protectedErrors, vessel } from '../schemas.js';
import { checkVesselFile } from '../vessel-file.js';

export const vesselRoutes: FastifyPluginAsyncZod = async (app) => {
  const body = z.record(z.string(), z.unknown()).meta({ description: 'A vessel in the vessel-file format' });

  app.get(
    '/api/vessels',
    {
      config: { roles: READERS },
      schema: { tags: ['vessels'], summary: 'Vessels with their outlets', querystring: paging, response: { 200: pageOf(vessel), ...protectedErrors } },
    },
    async (request) => ({ ...app.store.vessels.list(request.query.limit, request.query.offset), ...request.query }),
  );

  app.post(
    '/api/vessels',
    {
      config: { roles: ENGINEERS_UP },
      schema: { tags: ['vessels'], summary: 'Create a vessel from a vessel file', body, response: { 201: vessel, 409: problem, 422: problem, ...protectedErrors } },
    },
    async (request, reply) => {
      const spec = checkVesselFile(request.body);
      reply.code(201);
      return app.store.vessels.create(actorOf(request.user!), spec);
    },
  );

  app.get(
    '/api/vessels/:id',
    { config: { roles: READERS }, schema: { tags: ['vessels'], summary: 'One vessel', params: idParams, response: { 200: vessel, ...protectedErrors } } },
    async (request) => app.store.vessels.get(request.params.id),
  );

  app.put(
    '/api/vessels/:id',
    {
      config: { roles: ENGINEERS_UP },
      schema: {
        tags: ['vessels'],
        summary: 'Replace a vessel file (outlets matched by name; dropped ones retired)',
        params: idParams,
        body,
        response: { 200: vessel, 409: problem, 422: problem, ...protectedErrors },
      },
    },
    async (request) => app.store.vessels.update(actorOf(request.user!), request.params.id, checkVesselFile(request.body)),
  );
};
