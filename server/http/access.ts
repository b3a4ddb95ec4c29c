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
