/**
 * buildApp(options) → a Fastify instance, not listening (the CLI calls listen; tests call inject).
 * Order, after Fastify's own demo application: external plugins (security headers, rate limit,
 * cookies, multipart, OpenAPI and its docs page, static files), then the app's decorators (store,
 * analysis runner), then auth and error handling, then one route module per resource.
 */
import cookie from '@fastify/cookie';
import helmet from '@fastify/helmet';
import multipart from '@fastify/multipart';
import rateLimit from '@fastify/rate-limit';
import fastifyStatic from '@fastify/static';
import swagger from '@fastify/swagger';
import swaggerUi from '@fastify/swagger-ui';
import Fastify, { LogController, type FastifyInstance, type FastifyServerOptions } from 'fastify';
import {
  jsonSchemaTransform,
  jsonSchemaTransformObject,
  serializerCompiler,
  validatorCompiler,
  type ZodTypeProvider,
} from 'fastify-type-provider-zod';
import { existsSync } from 'node:fs';
import { z } from 'zod';
import { createNotifier, type Notifier } from '../jobs/alerts.js';
import { ExportJobs } from '../jobs/exports.js';
import { createTaskPool, type TaskKind, type TaskRunner } from '../jobs/tasks.js';
import { currentSoftware } from '../render/software.js';
import type { AnalyzeRunner } from '../jobs/pool.js';
import type { Store } from '../store/index.js';
import { PUBLIC, scopeFromPath, type Access, type SiteScope } from './access.js';
import { installAuth } from './auth.js';
import './context.js';
import { installProblemHandlers } from './problems.js';
import { installSiteScope } from './site-scope.js';
import { peopleRoutes } from './routes/people.js';
import { auditRoutes } from './routes/audit.js';
import { eventRoutes } from './routes/events.js';
import { fitRoutes } from './routes/fits.js';
import { fitPeopleRoutes } from './routes/fit-people.js';
import { compareRoutes } from './routes/compare.js';
import { healthRoutes } from './routes/health.js';
import { sessionRoutes } from './routes/session.js';
import { systemRoutes } from './routes/systems.js';
import { jointFitRoutes } from './routes/joint-fits.js';
import { pendingRoutes } from './routes/pending.js';
import { testRoutes } from './routes/tests.js';
import { trendRoutes } from './routes/trend.js';
import { scheduleRoutes } from './routes/schedule.js';
import { vesselRoutes } from './routes/vessels.js';
import { vesselRevisionRoutes } from './routes/vessel-revisions.js';
import { reportRoutes } from './routes/reports.js';
import { workbenchRoutes } from './routes/workbench.js';
import { planRoutes } from './routes/plan.js';
import { liveRoutes } from './routes/live.js';
import { PACKAGE_VERSION } from '../core/version.js';

export interface AppOptions {
  store: Store;
  analyze: AnalyzeRunner;
  /** Largest accepted log file; default 40 MiB ≈ a million rows of "timestamp,level". */
  uploadLimitBytes?: number;
  /** Whole-request deadline (receiving the body included); default 120 s. */
  requestTimeoutMs?: number;
  sessionTtlMs?: number;
  /** Mark the session cookie Secure (set when served over HTTPS). */
  secureCookie?: boolean;
  /** Sign-in attempts per client address per minute. */
  signInPerMinute?: number;
  /**
   * Fastify's trustProxy (default false): behind a reverse proxy, true / a hop count / the proxy's
   * addresses, so request.ip (and the sign-in rate limit) is the client's, from X-Forwarded-For.
   */
  trustProxy?: boolean | number | string[];

  /** Folder of the built web front end, served at /; skipped when absent. */
  webRoot?: string | null;
  logger?: FastifyServerOptions['logger'];
  /**
   * Log every request (Fastify's "incoming request" / "request completed" lines at info). Off by
   * default: at info level a busy service spends much of its time writing them; with the logger at
   * debug, one line per answered request is written instead (method, url, status, ms).
   */
  logRequests?: boolean;
  /** Status-change notices: a notifier the caller owns, or webhook addresses for one the app owns (closed with it). */
  notifier?: Notifier;
  webhooks?: readonly string[];
  /** Least time between two refits of a live test (default 3 s). */
  liveRefitMs?: number;
  /** The trend's "now", epoch ms (tests inject a fixed time). */
  clockMs?: () => number;
  /** Origins besides the request's own from which cookie-authenticated writes are accepted (EFFLUX_ORIGINS). */
  allowedOrigins?: readonly string[];
  /** Heavy work off the event loop: a runner the caller owns, or a task pool the app makes (and closes with it). */
  tasks?: TaskRunner;
  /** Time limits of the app's own task pool, ms (one for every kind, or per kind); default jobs/tasks.ts. */
  taskTimeoutMs?: number | Partial<Record<TaskKind, number>>;
  /** Threads of the app's own task pool; default half the cores, at least one. */
  taskThreads?: number;
}

export interface RouteInfo {
  method: string;
  url: string;
  roles: Access;
  scope: SiteScope;
}

declare module 'fastify' {
  interface FastifyInstance {
    /** Every route registered, with its declared roles (the permission test walks this). */
    routeList: RouteInfo[];
    /** Queues status-change notices to the webhook addresses (a no-op without any). */
    notifier: Notifier;
    clockMs: () => number;
  }
}

export const DEFAULT_UPLOAD_LIMIT = 40 * 1024 * 1024;
const DOCS_PREFIX = '/api/docs';

/** Content-Security-Policy: only this origin, no inline script, no framing, no plugins. */
const STRICT_CSP = {
  defaultSrc: ["'self'"],
  baseUri: ["'self'"],
  scriptSrc: ["'self'"],
  styleSrc: ["'self'"],
  imgSrc: ["'self'", 'data:'],
  fontSrc: ["'self'"],
  connectSrc: ["'self'"],
  objectSrc: ["'none'"],
  frameAncestors: ["'none'"],
  formAction: ["'self'"],
  upgradeInsecureRequests: null,
};
/** The docs page's bundled UI sets inline styles; it alone gets 'unsafe-inline' for styles. */
const DOCS_CSP =
  "default-src 'self';base-uri 'self';script-src 'self';style-src 'self' 'unsafe-inline';img-src 'self' data:;" +
  "font-src 'self';connect-src 'self';object-src 'none';frame-ancestors 'none';form-action 'self'";

export async function buildApp(opts: AppOptions): Promise<FastifyInstance> {
  const app = Fastify({
    logger: opts.logger ?? false,
    requestTimeout: opts.requestTimeoutMs ?? 120_000,
    connectionTimeout: 30_000,
    keepAliveTimeout: 10_000,
    bodyLimit: 1024 * 1024, // JSON bodies (vessel files, reviews); uploads have their own limit
    return503OnClosing: true,
    // a hop count as the function Fastify makes of it (its types take no number)
    trustProxy:
      typeof opts.trustProxy === 'number'
        ? (
            (hops: number) => (_addr: string, hop: number) =>
              hop < hops
          )(opts.trustProxy)
        : (opts.trustProxy ?? false),
    logController: new LogController({ disableRequestLogging: !opts.logRequests }),
  }).withTypeProvider<ZodTypeProvider>();
  if (!opts.logRequests) {
    const debugOn = (level: string) => level === 'debug' || level === 'trace';
    app.addHook('onResponse', (request, reply, done) => {
      if (debugOn(request.log.level)) {
        request.log.debug(
          {
            method: request.method,
            url: request.url,
            statusCode: reply.statusCode,
            ms: Math.round(reply.elapsedTime * 10) / 10,
          },
          'request',
        );
      }
      done();
    });
  }
  app.setValidatorCompiler(validatorCompiler);
  app.setSerializerCompiler(serializerCompiler);

  // Every route declares who may call it; one under /api that does not is a programming error.
  app.decorate('routeList', [] as RouteInfo[]);
  app.addHook('onRoute', (route) => {
    let roles = route.config?.roles;
    if (roles === undefined) {
      if (route.url.startsWith(DOCS_PREFIX) || !route.url.startsWith('/api')) {
        roles = PUBLIC;
        route.config = { ...(route.config ?? {}), roles };
      } else {
        throw new Error(
          `route ${String(route.method)} ${route.url} declares no roles (config.roles)`,
        );
      }
    }
    // and which site its record belongs to (people limited to sites): from the path, else declared
    let scope = route.config?.scope ?? scopeFromPath(route.url);
    if (scope === undefined) {
      if (roles === PUBLIC) scope = 'none';
      else
        throw new Error(
          `route ${String(route.method)} ${route.url} declares no site scope (config.scope)`,
        );
    }
    route.config = { ...(route.config ?? {}), roles, scope };
    for (const method of [route.method].flat())
      app.routeList.push({ method, url: route.url, roles, scope });
  });

  // external plugins
  // security headers on every answer, by helmet as a plugin (the strict CSP is ours)
  await app.register(helmet, {
    contentSecurityPolicy: { useDefaults: false, directives: STRICT_CSP },
    crossOriginEmbedderPolicy: false,
  });
  await app.register(rateLimit, {
    global: false,
    errorResponseBuilder: (_req, ctx) => ({
      statusCode: 429,
      message: `too many sign-in attempts; retry in ${ctx.after}`,
    }),
  });
  await app.register(cookie);
  await app.register(multipart, {
    limits: {
      fileSize: opts.uploadLimitBytes ?? DEFAULT_UPLOAD_LIMIT,
      files: 2,
      fields: 40,
      parts: 50,
      fieldSize: 64 * 1024,
    },
  });
  await app.register(swagger, {
    openapi: {
      openapi: '3.1.0',
      info: {
        title: 'efflux API',
        version: PACKAGE_VERSION,
        description: 'Drain tests, fits, history and audit for gravity-draining vessels.',
      },
      components: {
        securitySchemes: {
          bearer: { type: 'http', scheme: 'bearer' },
          session: { type: 'apiKey', in: 'cookie', name: 'efflux_session' },
        },
      },
      security: [{ bearer: [] }, { session: [] }],
    },
    transform: jsonSchemaTransform,
    transformObject: jsonSchemaTransformObject,
  });
  await app.register(swaggerUi, { routePrefix: DOCS_PREFIX });
  // While stopping, answers that were in flight close their connection, so the process does not
  // wait out keep-alive timeouts before it can exit.
  let closing = false;
  app.addHook('preClose', async () => {
    closing = true;
  });
  app.addHook('onSend', async (request, reply) => {
    if (request.url.startsWith(DOCS_PREFIX)) reply.header('content-security-policy', DOCS_CSP);
    if (closing) reply.header('connection', 'close');
  });
  if (opts.webRoot && existsSync(opts.webRoot))
    await app.register(fastifyStatic, { root: opts.webRoot, prefix: '/' });

  // decorators
  app.decorate('store', opts.store);
  app.decorate('analyze', opts.analyze);
  const ownNotifier = opts.notifier
    ? null
    : createNotifier({
        urls: opts.webhooks ?? [],
        log: (line, detail) => app.log.warn(detail ?? {}, line),
      });
  app.decorate('notifier', opts.notifier ?? ownNotifier!);
  if (ownNotifier) app.addHook('onClose', async () => ownNotifier.close());
  app.decorate('clockMs', opts.clockMs ?? Date.now);
  let tasks = opts.tasks;
  if (!tasks) {
    const pool = createTaskPool({ timeoutMs: opts.taskTimeoutMs, threads: opts.taskThreads });
    tasks = pool.run;
    app.addHook('onClose', async () => pool.close());
  }
  app.decorate('tasks', tasks);
  const exportJobs = new ExportJobs({
    store: opts.store,
    tasks,
    software: currentSoftware,
    log: (detail, line) => app.log.error(detail, line),
  });
  app.decorate('exports', exportJobs);
  app.addHook('preClose', async () => exportJobs.close());

  // auth and errors (on the root: both are inherited by every route module below)
  installAuth(
    app,
    opts.store,
    (opts.allowedOrigins ?? []).map((o) => o.toLowerCase()),
  );
  installSiteScope(app, opts.store);
  installProblemHandlers(app);

  // routes
  await app.register(healthRoutes);
  await app.register(sessionRoutes, {
    ttlMs: opts.sessionTtlMs ?? 12 * 3600_000,
    secureCookie: opts.secureCookie ?? false,
    signInPerMinute: opts.signInPerMinute ?? 10,
  });
  await app.register(vesselRoutes);
  await app.register(vesselRevisionRoutes);
  await app.register(testRoutes);
  await app.register(pendingRoutes);
  await app.register(fitRoutes);
  await app.register(fitPeopleRoutes);
  await app.register(compareRoutes);
  await app.register(eventRoutes);
  await app.register(trendRoutes);
  await app.register(auditRoutes);
  await app.register(reportRoutes);
  await app.register(workbenchRoutes);
  await app.register(systemRoutes);
  await app.register(jointFitRoutes);
  await app.register(planRoutes);
  await app.register(liveRoutes, {
    limitBytes: opts.uploadLimitBytes ?? DEFAULT_UPLOAD_LIMIT,
    refitMs: opts.liveRefitMs,
  });
  await app.register(peopleRoutes);
  await app.register(scheduleRoutes);
  app.get(
    '/api/openapi.json',
    {
      config: { roles: PUBLIC },
      schema: { hide: true, response: { 200: z.record(z.string(), z.unknown()) } },
    },
    async () => app.swagger() as unknown as Record<string, unknown>,
  );
  return app;
}
