import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { PUBLIC } from '../access.js';

export const healthRoutes: FastifyPluginAsyncZod = async (app) => {
  const demo = await app.store.meta.isDemo(); // marked before the service is built; never unmarked
  app.get(
    '/api/health',
    {
      config: { roles: PUBLIC },
      schema: {
        tags: ['service'],
        summary:
          'Liveness: the service answers and its database reads; `demo` when the data folder holds the invented demo scenario',
        response: { 200: z.object({ status: z.literal('ok'), demo: z.boolean() }) },
      },
    },
    async () => {
      await app.store.sql.value('SELECT 1'); // the database answers
      return { status: 'ok' as const, demo };
    },
  );
};
