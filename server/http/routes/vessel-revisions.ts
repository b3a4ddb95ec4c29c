/**
 * Earlier revisions of a vessel file (migration 007): every save is a revision, kept as saved; each
 * fit names the revision it was computed with.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { READERS } from '../access.js';
import { idParams, protectedErrors } from '../schemas.js';

const revisionInfo = z
  .object({
    revision: z.number().int(),
    savedAt: z.string(),
    savedBy: z.string().nullable(),
    fitIds: z.array(z.number().int()),
  })
  .meta({ id: 'VesselRevisionInfo' });

const revisionBody = z
  .object({
    vesselId: z.number().int(),
    revision: z.number().int(),
    savedAt: z.string(),
    spec: z.record(z.string(), z.unknown()),
  })
  .meta({ id: 'VesselRevision' });

export const vesselRevisionRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/vessels/:id/revisions',
    {
      config: { roles: READERS, scope: 'vessel' },
      schema: {
        tags: ['vessels'],
        summary:
          "A vessel's saved revisions, newest first, with who saved each and the fits made with it",
        params: idParams,
        response: { 200: z.object({ items: z.array(revisionInfo) }), ...protectedErrors },
      },
    },
    async (request) => ({ items: await app.store.vesselRevisions.list(request.params.id) }),
  );

  app.get(
    '/api/vessels/:id/revisions/:revision',
    {
      config: { roles: READERS, scope: 'vessel' },
      schema: {
        tags: ['vessels'],
        summary: 'One revision of a vessel file, as it was saved',
        params: idParams.extend({ revision: z.coerce.number().int().positive() }),
        response: { 200: revisionBody, ...protectedErrors },
      },
    },
    async (request) => app.store.vesselRevisions.get(request.params.id, request.params.revision),
  );

  app.get(
    '/api/fits/:id/vessel-revision',
    {
      config: { roles: READERS, scope: 'fit' },
      schema: {
        tags: ['fits'],
        summary: 'The vessel revision a fit was computed with, and that revision’s vessel file',
        params: idParams,
        response: { 200: revisionBody, ...protectedErrors },
      },
    },
    async (request) => {
      const { vesselId, revision } = await app.store.vesselRevisions.ofFit(request.params.id);
      return app.store.vesselRevisions.get(vesselId, revision);
    },
  );
};
