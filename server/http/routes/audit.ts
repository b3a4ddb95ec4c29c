import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { tagText } from '../../core/limits.js';
import { AUDITORS } from '../access.js';
import { verifyRecords } from '../../jobs/verify-records.js';
import { HttpProblem } from '../problems.js';
import { protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';

const recordDifference = z.object({
  table: z.string(),
  row: z.number().int(),
  field: z.string(),
  stored: z.unknown(),
  expected: z.unknown(),
  message: z.string(),
});

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
      config: { roles: AUDITORS, scope: 'listed' },
      schema: {
        tags: ['audit'],
        summary:
          'The audit log, oldest first (page on with afterSeq) or with order=newest newest first (page on with beforeSeq); a person limited to sites: one vessel of theirs at a time, vesselId',
        querystring: z.object({
          entityType: tagText().optional(),
          entityId: tagText().optional(),
          actorId: z.coerce.number().int().optional(),
          action: tagText().optional(),
          vesselId: z.coerce.number().int().positive().optional().meta({
            description:
              'entries of the vessel and of its outlets, tests, fits and maintenance events',
          }),
          since: tagText().optional(),
          until: tagText().optional(),
          afterSeq: z.coerce.number().int().min(0).default(0),
          beforeSeq: z.coerce.number().int().min(1).optional(),
          order: z.enum(['oldest', 'newest']).default('oldest'),
          limit: z.coerce.number().int().min(1).max(1000).default(100),
        }),
        response: {
          200: z.object({
            items: z.array(entry),
            nextAfterSeq: z
              .number()
              .int()
              .nullable()
              .meta({ description: 'oldest first: the afterSeq of the next page (null: none)' }),
            nextBeforeSeq: z
              .number()
              .int()
              .nullable()
              .meta({ description: 'newest first: the beforeSeq of the next page (null: none)' }),
          }),
          ...protectedErrors,
        },
      },
    },
    async (request) => {
      if (sitesOf(request) !== null) {
        if (request.query.vesselId === undefined)
          throw new HttpProblem(
            403,
            'site-forbidden',
            'a person limited to sites reads the audit log of one vessel at a time: give vesselId',
          );
        assertSite(request, await app.store.sites.siteOf('vessel', request.query.vesselId));
      }
      const { order, ...filter } = request.query;
      const newestFirst = order === 'newest';
      const items = await app.store.audit.list({ ...filter, newestFirst });
      const last = items.length === request.query.limit ? items[items.length - 1].seq : null;
      return {
        items,
        nextAfterSeq: newestFirst ? null : last,
        nextBeforeSeq: newestFirst ? last : null,
      };
    },
  );

  app.get(
    '/api/audit/verify',
    {
      config: { roles: AUDITORS, scope: 'every-site' },
      schema: {
        tags: ['audit'],
        summary:
          'Walk the hash chain and check every stored copy (result columns, status cache) against what it was copied from',
        response: {
          200: z.object({
            ok: z.boolean(),
            count: z.number().int(),
            head: z.string(),
            brokenAt: z.number().int().optional(),
            reason: z.string().optional(),
            records: z.object({
              ok: z.boolean(),
              fitsChecked: z.number().int(),
              outletsChecked: z.number().int(),
              differences: z.array(recordDifference),
              undatedTests: z.array(z.object({ testId: z.number().int(), reason: z.string() })),
            }),
          }),
          ...protectedErrors,
        },
      },
    },
    async () => {
      const chain = await app.store.audit.verify();
      const records = await verifyRecords(app.store);
      return { ...chain, ok: chain.ok && records.ok, records };
    },
  );
};
