import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS } from '../access.js';
import { idParams, pageOf, paging, problem, protectedErrors, vessel } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';
import { checkVesselFile } from '../vessel-file.js';

/** The site a vessel file names ("main" when it names none, as the store reads it). */
const siteOfSpec = (spec: Record<string, unknown>) =>
  typeof spec.site === 'string' && spec.site.length > 0 ? spec.site : 'main';

export const vesselRoutes: FastifyPluginAsyncZod = async (app) => {
  const body = z
    .record(z.string(), z.unknown())
    .meta({ description: 'A vessel in the vessel-file format' });

  app.get(
    '/api/vessels',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['vessels'],
        summary: 'Vessels with their outlets (of the sites the person may see)',
        querystring: paging,
        response: { 200: pageOf(vessel), ...protectedErrors },
      },
    },
    async (request) => ({
      ...(await app.store.vessels.list(
        request.query.limit,
        request.query.offset,
        sitesOf(request),
      )),
      ...request.query,
    }),
  );

  app.post(
    '/api/vessels',
    {
      config: { roles: ENGINEERS_UP, scope: 'listed' },
      schema: {
        tags: ['vessels'],
        summary: 'Create a vessel from a vessel file',
        body,
        response: { 201: vessel, 409: problem, 422: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const spec = checkVesselFile(request.body);
      assertSite(request, siteOfSpec(spec));
      reply.code(201);
      return await app.store.vessels.create(actorOf(request.user!), spec);
    },
  );

  app.get(
    '/api/vessels/:id',
    {
      config: { roles: READERS },
      schema: {
        tags: ['vessels'],
        summary: 'One vessel',
        params: idParams,
        response: { 200: vessel, ...protectedErrors },
      },
    },
    async (request) => await app.store.vessels.get(request.params.id),
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
    async (request) => {
      const spec = checkVesselFile(request.body);
      assertSite(request, siteOfSpec(spec)); // its own site was checked before; nor may it move to another
      return await app.store.vessels.update(actorOf(request.user!), request.params.id, spec);
    },
  );
};
