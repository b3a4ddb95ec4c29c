/**
 * Joint fits of connected vessels kept as records (store/joint-fits.ts, migration 009): store one
 * (the same upload as POST /api/systems/fit, fitted in the task pool, then kept with its files),
 * list them per system, read one, review it with four eyes, and its PDF report (rendered in the
 * task pool). Every route is 'listed' for site limits: a joint fit's site is the system file's
 * "site" (or the form's), and each handler checks it.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import { jointFitResult } from '../../core/fit-result/schema.js';
import { InputError } from '../../core/errors.js';
import { nameText, noteText } from '../../core/limits.js';
import { buildJointFitReport } from '../../core/report/joint-fit-report.js';
import { parseSystemFile } from '../../core/system/schema.js';
import { currentSoftware } from '../../render/software.js';
import { sha256Hex } from '../../sha256.js';
import type { StoredJointFit } from '../../store/joint-fits.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS, TECHNICIANS_UP } from '../access.js';
import { problem, protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';
import { fitFields, readSystemUpload } from './systems.js';

const storeFields = fitFields.extend({
  site: nameText().min(1).optional(),
  notes: noteText().optional(),
});

const idParams = z.object({ id: z.coerce.number().int().positive() });

const curve = z.object({
  id: z.string(),
  fileName: z.string(),
  timeS: z.array(z.number()),
  levelM: z.array(z.number().nullable()),
  fittedM: z.array(z.number().nullable()),
});

const summary = z.object({
  id: z.number(),
  site: z.string(),
  systemName: z.string(),
  status: z.enum(['draft', 'approved', 'rejected']),
  engineVersion: z.string(),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
  reviewedBy: z.string().nullable(),
  reviewedAt: z.string().nullable(),
});

const storedJointFit = summary
  .extend({
    createdById: z.number().nullable(),
    settings: z.record(z.string(), z.unknown()),
    result: jointFitResult,
    drawing: z.array(curve),
    notes: z.string().nullable(),
    files: z.array(
      z.object({
        role: z.enum(['system', 'level', 'inflow']),
        vessel: z.string(),
        fileName: z.string(),
        sha256: z.string(),
        size: z.number(),
      }),
    ),
    review: z
      .object({
        decision: z.enum(['approved', 'rejected']),
        comment: z.string().nullable(),
        by: z.string().nullable(),
        byId: z.number().nullable(),
        at: z.string(),
        selfReview: z.boolean(),
      })
      .nullable(),
  })
  .meta({
    id: 'StoredJointFit',
    description:
      'A joint fit of connected vessels as stored: the result (the one fit-result shape), the settings, the files kept, the review, and each log thinned with the fitted curve (drawing)',
  });

export const jointFitRoutes: FastifyPluginAsyncZod = async (app) => {
  const { store } = app;

  /** The stored fit, after the site check (404 before 403 would tell an outsider it exists: site first). */
  async function readable(request: FastifyRequest, id: number): Promise<StoredJointFit> {
    assertSite(request, await store.jointFits.siteOf(id));
    return store.jointFits.get(id);
  }

  app.post(
    '/api/systems/fits',
    {
      config: { roles: TECHNICIANS_UP, scope: 'listed' },
      schema: {
        tags: ['systems'],
        summary: 'Fit connected vessels and keep the fit as a draft record, with its files',
        description:
          'multipart/form-data as POST /api/systems/fit (file "system", one "log:ID" per vessel, one "inflow:ID" per logged inflow, the same text fields), plus optional "site" (when the system file names none) and "notes". The fit runs in the task pool; the answer is the stored draft (201).',
        consumes: ['multipart/form-data'],
        response: {
          201: storedJointFit,
          409: problem,
          413: problem,
          415: problem,
          422: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const { system, logs, flows, fields } = await readSystemUpload(request, storeFields);
      const { site: siteField, notes, ...settings } = fields;
      // the system file is read here too (small) so a site outside the person's limits is refused
      // before the heavy work
      const spec = parseSystemFile(new TextDecoder().decode(system.bytes), system.fileName);
      const site = siteField ?? spec.site;
      if (!site)
        throw new InputError(
          'the system file names no site: add "site" to it, or give the site in the form',
          { field: 'site' },
        );
      if (siteField && spec.site && siteField !== spec.site)
        throw new InputError(
          `the system file is for site "${spec.site}" but the form names "${siteField}"`,
          { field: 'site' },
        );
      assertSite(request, site);
      // copied to the task thread, not moved: the bytes are stored afterwards
      const answer = (await app.tasks('system-fit', {
        system,
        logs: [...logs],
        flows: [...flows],
        fields: settings,
      })) as Record<string, unknown>;
      const { drawing, ...result } = answer;
      const stored = await store.jointFits.create(actorOf(request.user!), {
        site,
        systemName: spec.name,
        settings,
        result: jointFitResult.parse(result),
        drawing,
        notes: notes ?? null,
        files: [
          { role: 'system', vessel: '', ...system },
          ...[...logs].map(([vessel, f]) => ({ role: 'level' as const, vessel, ...f })),
          ...[...flows].map(([vessel, f]) => ({ role: 'inflow' as const, vessel, ...f })),
        ],
      });
      reply.code(201);
      return stored as z.infer<typeof storedJointFit>;
    },
  );

  app.get(
    '/api/systems/fits',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['systems'],
        summary: 'Stored joint fits, newest first; "system" narrows to one system by its name',
        querystring: z.object({
          system: nameText().min(1).optional(),
          limit: z.coerce.number().int().min(1).max(500).default(100),
        }),
        response: { 200: z.object({ items: z.array(summary) }), ...protectedErrors },
      },
    },
    async (request) => ({
      items: await store.jointFits.list({
        sites: sitesOf(request),
        systemName: request.query.system,
        limit: request.query.limit,
      }),
    }),
  );

  app.get(
    '/api/systems/fits/:id',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['systems'],
        summary: 'One stored joint fit (its result is what steady and linearize take)',
        params: idParams,
        response: { 200: storedJointFit, ...protectedErrors },
      },
    },
    async (request) =>
      (await readable(request, request.params.id)) as z.infer<typeof storedJointFit>,
  );

  app.post(
    '/api/systems/fits/:id/review',
    {
      config: { roles: ENGINEERS_UP, scope: 'listed' },
      schema: {
        tags: ['systems'],
        summary:
          'Approve or reject a draft joint fit (four eyes: not the person who stored it, unless the site allows self-review)',
        params: idParams,
        body: z.object({ decision: z.enum(['approve', 'reject']), comment: noteText().optional() }),
        response: { 200: storedJointFit, 409: problem, ...protectedErrors },
      },
    },
    async (request) => {
      await readable(request, request.params.id);
      return (await store.jointFits.review(
        actorOf(request.user!),
        request.params.id,
        request.body.decision === 'approve' ? 'approved' : 'rejected',
        request.body.comment ?? null,
      )) as z.infer<typeof storedJointFit>;
    },
  );

  app.get(
    '/api/systems/fits/:id/report.pdf',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['reports'],
        summary:
          'The report of a stored joint fit as PDF (drafts and rejected fits marked on every page)',
        params: idParams,
        response: {
          200: z.any().meta({ description: 'the document' }),
          503: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const fit = await readable(request, request.params.id);
      const report = buildJointFitReport(fit, currentSoftware(), sha256Hex);
      const pdf = await app.tasks('joint-fit-report-pdf', report);
      return reply
        .type('application/pdf')
        .header(
          'content-disposition',
          `attachment; filename="joint-fit-${fit.id}-${report.reportId}.pdf"`,
        )
        .header('x-report-id', report.reportId)
        .send(Buffer.from(pdf.buffer, pdf.byteOffset, pdf.byteLength));
    },
  );
};
