/**
 * Site limits of a person (null = every site): the check before the handler for routes whose
 * record comes from the path, and the helpers the 'listed' routes use (access.ts, SiteScope).
 */
import type { FastifyInstance, FastifyRequest } from 'fastify';
import type { Store } from '../store/index.js';
import { HttpProblem } from './problems.js';

/** The sites the signed-in person may see and act on; null = every site. */
export function sitesOf(request: FastifyRequest): string[] | null {
  return request.user?.sites ?? null;
}

export function outsideSites(site: string, sites: readonly string[]): HttpProblem {
  return new HttpProblem(
    403,
    'site-forbidden',
    `this record belongs to site "${site}"; you may act on ${sites.map((s) => `"${s}"`).join(', ')} only`,
  );
}

/** 403 unless the person may act on `site`. */
export function assertSite(request: FastifyRequest, site: string): void {
  const sites = sitesOf(request);
  if (sites !== null && !sites.includes(site)) throw outsideSites(site, sites);
}

/** 403 for a person limited to sites (people and site management, the whole audit chain). */
export function assertEverySite(request: FastifyRequest, what: string): void {
  const sites = sitesOf(request);
  if (sites !== null)
    throw new HttpProblem(
      403,
      'site-forbidden',
      `${what} is for people with no site limit; you may act on ${sites.map((s) => `"${s}"`).join(', ')} only`,
    );
}

export function installSiteScope(app: FastifyInstance, store: Store): void {
  // before validation, so a record of another site is refused whatever the body holds
  app.addHook('preValidation', async (request) => {
    const scope = request.routeOptions.config.scope;
    const sites = sitesOf(request);
    if (sites === null || scope === undefined || scope === 'none' || scope === 'listed') return;
    if (scope === 'every-site')
      return assertEverySite(request, `${request.method} ${request.routeOptions.url}`);
    const id = Number((request.params as { id?: string }).id);
    if (!Number.isInteger(id) || id <= 0) return; // validation answers 400 next
    const site = await store.sites.siteOf(scope, id); // 404 when there is no such record
    if (!sites.includes(site)) throw outsideSites(site, sites);
  });
}
