/**
 * Trends per outlet and for the fleet: the trend with its epochs, lines, bands, forecast and step
 * check; the history as CSV; the fleet in the order to act on it; the outlet's action threshold.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { nameText } from '../../core/limits.js';
import { InputError } from '../../core/errors.js';
import {
  fleetStatus,
  historyCsv,
  outletTrendView,
  STATUS_WORDS,
  thresholdOf,
} from '../../jobs/trend.js';
import { setOutletThreshold } from '../../jobs/outlet-settings.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS } from '../access.js';
import { idParams, outlet, paging, problem, protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';
import { asOfQuery, fleetView, statusChange, threshold, trendView } from './trend-schemas.js';

export const trendRoutes: FastifyPluginAsyncZod = async (app) => {
  const nowOf = (asOf: string | undefined) =>
    asOf === undefined ? app.clockMs() : Date.parse(asOf);

  app.get(
    '/api/outlets/:id/trend',
    {
      config: { roles: READERS },
      schema: {
        tags: ['trend'],
        summary:
          "An outlet's approved fits over time: epochs, weighted lines with 95 % bands, threshold, forecast, step check, status",
        params: idParams,
        querystring: asOfQuery,
        response: { 200: trendView, 422: problem, ...protectedErrors },
      },
    },
    async (request) => outletTrendView(app.store, request.params.id, nowOf(request.query.asOf)),
  );

  app.get(
    '/api/outlets/:id/history.csv',
    {
      config: { roles: READERS },
      schema: {
        tags: ['trend'],
        summary:
          "An outlet's approved fits with standard uncertainties and epoch, as CSV for a spreadsheet",
        params: idParams,
        querystring: asOfQuery,
        produces: ['text/csv'],
        response: {
          200: z
            .string()
            .meta({ description: 'text/csv; header row, then one row per approved fit' }),
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const view = await outletTrendView(app.store, request.params.id, nowOf(request.query.asOf));
      const name = `${view.outlet.vesselName}-${view.outlet.key}-history.csv`.replace(
        /[^\w.-]+/g,
        '_',
      );
      return reply
        .type('text/csv; charset=utf-8')
        .header('content-disposition', `attachment; filename="${name}"`)
        .serializer((x: string) => x)
        .send(historyCsv(view) as never);
    },
  );

  app.get(
    '/api/outlets/:id/status-changes',
    {
      config: { roles: READERS },
      schema: {
        tags: ['trend'],
        summary: "Changes of an outlet's status caused by approvals, oldest first",
        params: idParams,
        response: { 200: z.array(statusChange), ...protectedErrors },
      },
    },
    async (request) => {
      await app.store.vessels.outlet(request.params.id);
      return await app.store.trends.statusChanges(request.params.id);
    },
  );

  app.put(
    '/api/outlets/:id/settings',
    {
      config: { roles: ENGINEERS_UP },
      schema: {
        tags: ['trend'],
        summary:
          "Set an outlet's action threshold (fraction of the baseline Cd·a; null: the default 0.9). Stored in the vessel file, so it is a vessel update",
        params: idParams,
        body: z
          .object({
            actionThreshold: z
              .number()
              .gt(0)
              .lt(2)
              .refine((x) => x !== 1, 'a threshold of exactly the baseline is no threshold')
              .nullable(),
          })
          .strict(),
        response: {
          200: z.object({ outlet, threshold }),
          409: problem,
          422: problem,
          ...protectedErrors,
        },
      },
    },
    async (request) => {
      const after = await setOutletThreshold(
        app.store,
        actorOf(request.user!),
        request.params.id,
        request.body.actionThreshold,
      );
      return { outlet: after, threshold: thresholdOf(after) };
    },
  );

  app.get(
    '/api/fleet',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['trend'],
        summary:
          'Every outlet (of the sites the person may see) with its status and days to threshold, soonest first; filter by site and status (comma-separated)',
        querystring: paging
          .extend({
            site: nameText().min(1).optional(),
            status: nameText().min(1).optional(),
            retired: z.enum(['true', 'false']).optional(),
          })
          .merge(asOfQuery),
        response: { 200: fleetView, ...protectedErrors },
      },
    },
    async (request) => {
      const q = request.query;
      const words = q.status
        ?.split(',')
        .map((s) => s.trim())
        .filter(Boolean);
      for (const w of words ?? []) {
        if (!(STATUS_WORDS as readonly string[]).includes(w))
          throw new InputError(`unknown status "${w}"; one of: ${STATUS_WORDS.join(', ')}`, {
            field: 'status',
          });
      }
      if (q.site !== undefined) assertSite(request, q.site);
      const view = await fleetStatus(
        app.store,
        {
          site: q.site,
          sites: sitesOf(request),
          status: words as never,
          includeRetired: q.retired === 'true',
        },
        nowOf(q.asOf),
      );
      return {
        ...view,
        total: view.items.length,
        limit: q.limit,
        offset: q.offset,
        items: view.items.slice(q.offset, q.offset + q.limit),
      };
    },
  );
};
