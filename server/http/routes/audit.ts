import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { tagText } from '../../core/limits.js';
import { AUDITORS } from '../access.js';
import { protectedErrors } from '../schemas.js';

const entry = z
  .object({
    seq: z.number().int(),
    at: z.string(),
    actorId: z.number().int().nullable(),
    actorName: z.string(),
    action: z.string(),
    entityType: z.string(),
    entityId: z.string().nullable(),
    before: z.unknown(),
    after: z.unknown(),
    prevHash: z.string(),
    hash: z.string(),
  })
  .meta({ id: 'AuditEntry' });

export const auditRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/audit',
    {
      config: { roles: AUDITORS },
      schema: {
        tags: ['audit'],
        summary: 'The audit log, oldest first; page on with afterSeq',
        querystring: z.object({
          entityType: tagText().optional(),
          entityId: tagText().optional(),
          actorId: z.coerce.number().int().optional(),
          action: tagText().optional(),
          vesselId: z.coerce.number().int().positive().optional().meta({ description: 'entries of the vessel and of its outlets, tests, fits and maintenance events' }),
          since: tagText().optional(),
          until: tagText().optional(),
          afterSeq: z.coerce.number().int().min(0).default(0),
          limit: z.coerce.number().int().min(1).max(1000).default(100),
        }),
        response: { 200: z.object({ items: z.array(entry), nextAfterSeq: z.number().int().nullable() }), ...protectedErrors },
      },
    },
    async (request) => {
      const items = app.store.audit.list(request.query);
      return { items, nextAfterSeq: items.length === request.query.limit ? items[items.length - 1].seq : null };
    },
  );

  app.get(
    '/api/audit/verify',
    {
      config: { roles: AUDITORS },
      schema: {
        tags: ['audit'],
        summary: 'Walk the hash chain; names the first entry that does not fit',
        response: {
          200: z.object({ ok: z.boolean(), count: z.number().int(), head: z.string(), brokenAt: z.number().int().optional(), reason: z.string().optional() }),
          ...protectedErrors,
        },
      },
    },
    async () => app.store.audit.verify(),
  );
};
