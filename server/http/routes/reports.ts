/**
 * Reports: one fit's report (PDF or canonical JSON), an outlet's history report, and period exports
 * (zip) as jobs. Readers: every signed-in role may fetch fit and outlet reports (a technician needs
 * the report of the test they ran); exports are for engineers, auditors and admins, each job seen
 * by the person who started it (and admins). PDFs and zips are made in the task pool
 * (server/jobs/tasks.ts): the report's records are read here, the rendering runs off the event loop
 * with a time limit (503 past it).
 * Registered by app.ts with `await app.register(reportRoutes);` beside the other route modules.
 */
import {
  DEFAULT_UNIT_SYSTEM,
  UNIT_SYSTEMS,
  type UnitSystem,
} from '../../core/format/unit-system.js';
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { nameText, tagText } from '../../core/limits.js';
import { reportJson } from '../../core/report/index.js';
import { fitReport, outletReport } from '../../render/report-service.js';
import { currentSoftware } from '../../render/software.js';
import { ENGINEERS_AND_AUDITORS, READERS } from '../access.js';
import { HttpProblem } from '../problems.js';
import { idParams, problem, protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';

const binary = z.any().meta({ description: 'the document' });
const bytes = (u: Uint8Array) => Buffer.from(u.buffer, u.byteOffset, u.byteLength);
const jobParams = z.object({ id: z.uuid() });
const exportJob = z
  .object({
    id: z.string(),
    state: z.enum(['running', 'done', 'failed']),
    done: z.number().int().meta({ description: 'reports made so far' }),
    total: z.number().int().meta({ description: 'reports in the export' }),
    selection: z.object({
      site: z.string().optional(),
      vessel: z.string().optional(),
      from: z.string().optional(),
      to: z.string().optional(),
    }),
    createdAt: z.string(),
    finishedAt: z.string().nullable(),
    bytes: z.number().int().nullable(),
    error: z.string().nullable(),
    statusUrl: z.string(),
    archiveUrl: z.string().nullable().meta({ description: 'where the zip is, once state is done' }),
  })
  .meta({ id: 'ExportJob' });
const withUrls = <T extends { id: string; state: string }>(j: T) => ({
  ...j,
  statusUrl: `/api/exports/${j.id}`,
  archiveUrl: j.state === 'done' ? `/api/exports/${j.id}/archive.zip` : null,
});

const unitsQuery = z
  .enum(UNIT_SYSTEMS)
  .optional()
  .meta({ description: "si or us; default: the asker's display preference (the JSON stays SI)" });

export const reportRoutes: FastifyPluginAsyncZod = async (app) => {
  /** A PDF is written in the units asked for, else in the asker's preference. */
  const unitsFor = async (asked: UnitSystem | undefined, userId: number | undefined) =>
    asked ??
    (userId === undefined
      ? DEFAULT_UNIT_SYSTEM
      : (await app.store.preferences.get(userId)).displayUnits);

  app.get(
    '/api/fits/:id/report.pdf',
    {
      config: { roles: READERS },
      schema: {
        tags: ['reports'],
        summary: "The fit's report as PDF (deterministic bytes)",
        params: idParams,
        querystring: z.object({ units: unitsQuery }),
        response: { 200: binary, 503: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const report = await fitReport(app.store, request.params.id, currentSoftware());
      const units = await unitsFor(request.query.units, request.user?.id);
      const pdf = await app.tasks('fit-report-pdf', { report, units });
      return reply
        .type('application/pdf')
        .header(
          'content-disposition',
          `attachment; filename="fit-${request.params.id}-${report.reportId}.pdf"`,
        )
        .header('x-report-id', report.reportId)
        .send(bytes(pdf));
    },
  );

  app.get(
    '/api/fits/:id/report.json',
    {
      config: { roles: READERS },
      schema: {
        tags: ['reports'],
        summary: "The fit's report as canonical JSON",
        params: idParams,
        response: { 200: binary, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const report = await fitReport(app.store, request.params.id, currentSoftware());
      return reply
        .type('application/json')
        .header('x-report-id', report.reportId)
        .send(reportJson(report as unknown as Record<string, unknown>));
    },
  );

  app.get(
    '/api/outlets/:id/report.pdf',
    {
      config: { roles: READERS },
      schema: {
        tags: ['reports'],
        summary: "An outlet's approved fits and trend as PDF",
        params: idParams,
        querystring: z.object({ asOf: tagText().optional(), units: unitsQuery }),
        response: { 200: binary, 422: problem, 503: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const report = await outletReport(
        app.store,
        request.params.id,
        currentSoftware(),
        request.query.asOf,
      );
      const units = await unitsFor(request.query.units, request.user?.id);
      const pdf = await app.tasks('outlet-report-pdf', { report, units });
      return reply
        .type('application/pdf')
        .header(
          'content-disposition',
          `attachment; filename="outlet-${request.params.id}-${report.reportId}.pdf"`,
        )
        .header('x-report-id', report.reportId)
        .send(bytes(pdf));
    },
  );

  app.post(
    '/api/exports',
    {
      config: { roles: ENGINEERS_AND_AUDITORS, scope: 'listed' },
      schema: {
        tags: ['reports'],
        summary:
          'Start an export of the approved fits of a site, vessel or period (zip of PDF reports, CSV summary, audit excerpt, SHA-256 manifest); 202 with the job',
        description:
          'Poll GET statusUrl for progress (done of total reports); once state is "done", GET archiveUrl. A selection that matches no approved fit is refused at once (422).',
        body: z.object({
          site: nameText().optional(),
          vessel: nameText().optional(),
          from: tagText().optional(),
          to: tagText().optional(),
        }),
        response: { 202: exportJob, 422: problem, 503: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const sites = sitesOf(request);
      if (sites !== null) {
        if (request.body.site === undefined)
          throw new HttpProblem(
            403,
            'site-forbidden',
            `a person limited to sites exports one site at a time: give site (${sites.join(', ')})`,
          );
        assertSite(request, request.body.site);
      }
      const job = await app.exports.start(request.user!.id, request.body);
      return reply.code(202).header('location', `/api/exports/${job.id}`).send(withUrls(job));
    },
  );

  app.get(
    '/api/exports/:id',
    {
      config: { roles: ENGINEERS_AND_AUDITORS, scope: 'listed' },
      schema: {
        tags: ['reports'],
        summary: 'An export job: state and progress',
        params: jobParams,
        response: { 200: exportJob, ...protectedErrors },
      },
    },
    async (request) => {
      const job = app.exports.get(
        request.params.id,
        request.user!.id,
        request.user!.role === 'admin',
      );
      if (!job)
        throw new HttpProblem(
          404,
          'not-found',
          `no export ${request.params.id} (exports are kept an hour after they finish, and not across restarts)`,
        );
      return withUrls(job);
    },
  );

  app.get(
    '/api/exports/:id/archive.zip',
    {
      config: { roles: ENGINEERS_AND_AUDITORS, scope: 'listed' },
      schema: {
        tags: ['reports'],
        summary: "A finished export's zip",
        params: jobParams,
        response: { 200: binary, 409: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const admin = request.user!.role === 'admin';
      const job = app.exports.get(request.params.id, request.user!.id, admin);
      if (!job)
        throw new HttpProblem(
          404,
          'not-found',
          `no export ${request.params.id} (exports are kept an hour after they finish, and not across restarts)`,
        );
      const zip = app.exports.zip(request.params.id, request.user!.id, admin);
      if (job.state !== 'done' || !zip)
        throw new HttpProblem(
          409,
          'not-ready',
          job.state === 'failed'
            ? `the export failed: ${job.error}`
            : `the export is not ready: ${job.done} of ${job.total} reports made`,
        );
      return reply
        .type('application/zip')
        .header('content-disposition', 'attachment; filename="efflux-export.zip"')
        .send(bytes(zip));
    },
  );
};
