import type { Role } from '../store/users.js';

/**
 * Who may call a route, declared on the route itself (`config.roles`). A route under /api with no
 * declaration refuses to register (see app.ts), so a new route cannot be left open by accident.
 * Auditors read everything and change nothing.
 */
export type Access = 'public' | readonly Role[];

export const PUBLIC: Access = 'public';
/** Anyone signed in. */
export const READERS: Access = ['technician', 'engineer', 'auditor', 'admin'];
/** Uploads and refits (a refit only makes a new draft). */
export const TECHNICIANS_UP: Access = ['technician', 'engineer', 'admin'];
/** Vessels, reviews, maintenance events. */
export const ENGINEERS_UP: Access = ['engineer', 'admin'];
/** Reading what engineers maintain. */
export const ENGINEERS_AND_AUDITORS: Access = ['engineer', 'auditor', 'admin'];
/** The audit log. */
export const AUDITORS: Access = ['auditor', 'admin'];

declare module 'fastify' {
  interface FastifyContextConfig {
    roles?: Access;
  }
}

/**
 * Which site a route's record belongs to, for people limited to sites (migration 003):
 * - 'vessel' | 'test' | 'fit' | 'outlet': the record named by `:id` (checked before the handler);
 * - 'listed': the handler narrows or checks what it reads itself (lists, fleet, exports, audit);
 * - 'every-site': only people with no site limit (people and site management, the whole chain);
 * - 'none': nothing site-owned is read or written (health, sign-in, connected-vessel fits).
 * Routes under /api/vessels/:id, /api/tests/:id, /api/fits/:id and /api/outlets/:id get theirs
 * from the path; every other /api route must declare `config.scope` or it refuses to register.
 */
export type SiteScope = 'vessel' | 'test' | 'fit' | 'outlet' | 'listed' | 'every-site' | 'none';

const FROM_PATH: [RegExp, SiteScope][] = [
  [/^\/api\/vessels\/:id(\/|$)/, 'vessel'],
  [/^\/api\/tests\/:id(\/|$)/, 'test'],
  [/^\/api\/fits\/:id(\/|$)/, 'fit'],
  [/^\/api\/outlets\/:id(\/|$)/, 'outlet'],
];

export function scopeFromPath(url: string): SiteScope | undefined {
  return FROM_PATH.find(([re]) => re.test(url))?.[1];
}

declare module 'fastify' {
  interface FastifyContextConfig {
    scope?: SiteScope;
  }
}
