/**
 * People, their tokens and the sites' settings, for admins with no site limit: add a person with a
 * role and optional site limits, change them, revoke them (every token and open session ends at
 * once), list and revoke tokens, and allow self-review on a site (four eyes waived, marked).
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { ROLES, type Person, type Role } from '../../store/users.js';
import { actorOf } from '../../store/users.js';
import type { Store } from '../../store/index.js';
import { ConflictError } from '../../store/errors.js';
import type { Access } from '../access.js';
import { idParams, problem, protectedErrors } from '../schemas.js';

const ADMINS: Access = ['admin'];
const role = z.enum(ROLES);
const siteList = z
  .array(z.string().min(1).max(200))
  .max(100)
  .nullable()
  .meta({ description: 'sites this person may see and act on; null or [] = every site' });

export const person = z
  .object({
    id: z.number().int(),
    name: z.string(),
    role,
    sites: z.array(z.string()).nullable(),
    createdAt: z.string(),
    revokedAt: z.string().nullable(),
  })
  .meta({ id: 'Person' });
const token = z
  .object({
    id: z.number().int(),
    userId: z.number().int(),
    userName: z.string(),
    name: z.string(),
    createdAt: z.string(),
    revokedAt: z.string().nullable(),
  })
  .meta({ id: 'TokenInfo' });
const site = z
  .object({
    id: z.number().int(),
    name: z.string(),
    selfReviewAllowed: z.boolean(),
    createdAt: z.string(),
  })
  .meta({ id: 'Site' });

/** Admins with no site limit who could still manage people, other than `exceptId`. */
async function otherFullAdmins(store: Store, exceptId: number): Promise<Person[]> {
  return (await store.users.people()).filter(
    (p) => p.id !== exceptId && p.role === 'admin' && p.sites === null && p.revokedAt === null,
  );
}

async function keepAnAdmin(
  store: Store,
  id: number,
  next: { role?: Role; sites?: string[] | null; revoked?: boolean },
): Promise<void> {
  const p = await store.users.person(id);
  const stillFull =
    !next.revoked &&
    (next.role ?? p.role) === 'admin' &&
    (next.sites === undefined ? p.sites === null : !next.sites?.length);
  if (
    p.role === 'admin' &&
    p.sites === null &&
    !stillFull &&
    (await otherFullAdmins(store, id)).length === 0
  ) {
    throw new ConflictError(
      `${p.name} is the last admin with no site limit; add another before changing or revoking this one`,
    );
  }
}

export const peopleRoutes: FastifyPluginAsyncZod = async (app) => {
  const cfg = { roles: ADMINS, scope: 'every-site' as const };

  app.get(
    '/api/people',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'Everyone with a role, their site limits and whether revoked',
        response: { 200: z.object({ items: z.array(person) }), ...protectedErrors },
      },
    },
    async () => ({
      items: await app.store.users.people(),
    }),
  );

  app.post(
    '/api/people',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary:
          'Add a named person with a role and optional site limits (no credential yet: POST /api/people/:id/tokens)',
        body: z
          .object({ name: z.string().trim().min(1).max(200), role, sites: siteList.optional() })
          .strict(),
        response: { 201: person, 409: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      reply.code(201);
      return await app.store.users.addPerson(
        actorOf(request.user!),
        request.body.name,
        request.body.role,
        request.body.sites ?? null,
      );
    },
  );

  app.patch(
    '/api/people/:id',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary:
          "Change a person's role or site limits (effective on their next request, open sessions included)",
        params: idParams,
        body: z.object({ role: role.optional(), sites: siteList.optional() }).strict(),
        response: { 200: person, 409: problem, ...protectedErrors },
      },
    },
    async (request) => {
      await keepAnAdmin(app.store, request.params.id, request.body);
      return await app.store.users.changePerson(
        actorOf(request.user!),
        request.params.id,
        request.body,
      );
    },
  );

  app.post(
    '/api/people/:id/revoke',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'Revoke a person: every token revoked, every open session ended at once',
        params: idParams,
        response: { 200: person, 409: problem, ...protectedErrors },
      },
    },
    async (request) => {
      await keepAnAdmin(app.store, request.params.id, { revoked: true });
      return await app.store.users.revokePerson(actorOf(request.user!), request.params.id);
    },
  );

  app.post(
    '/api/people/:id/tokens',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'A new API token for the person, shown in this answer only',
        params: idParams,
        body: z.object({ label: z.string().trim().min(1).max(200).default('web') }).strict(),
        response: {
          201: z.object({ token: z.string(), tokenId: z.number().int(), person }),
          409: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const out = await app.store.users.createTokenFor(
        actorOf(request.user!),
        request.params.id,
        request.body.label,
      );
      reply.code(201).header('cache-control', 'no-store');
      return {
        token: out.token,
        tokenId: out.tokenId,
        person: await app.store.users.person(request.params.id),
      };
    },
  );

  app.get(
    '/api/tokens',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'API tokens (never the secrets), of one person with personId',
        querystring: z.object({ personId: z.coerce.number().int().positive().optional() }),
        response: { 200: z.object({ items: z.array(token) }), ...protectedErrors },
      },
    },
    async (request) => ({ items: await app.store.users.tokens(request.query.personId ?? null) }),
  );

  app.delete(
    '/api/tokens/:id',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'Revoke a token: sessions opened with it end at once',
        params: idParams,
        response: { 200: token, 409: problem, ...protectedErrors },
      },
    },
    async (request) => await app.store.users.revokeToken(actorOf(request.user!), request.params.id),
  );

  app.get(
    '/api/sites',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary: 'Sites and their settings',
        response: { 200: z.object({ items: z.array(site) }), ...protectedErrors },
      },
    },
    async () => ({
      items: await app.store.sites.list(),
    }),
  );

  app.put(
    '/api/sites/:name/settings',
    {
      config: cfg,
      schema: {
        tags: ['people'],
        summary:
          'Allow self-review on a site with one qualified person (four eyes waived; every self-review is marked)',
        params: z.object({ name: z.string().min(1).max(200) }),
        body: z.object({ selfReviewAllowed: z.boolean() }).strict(),
        response: { 200: site, ...protectedErrors },
      },
    },
    async (request) =>
      await app.store.sites.setSelfReview(
        actorOf(request.user!),
        request.params.name,
        request.body.selfReviewAllowed,
      ),
  );
};
