/**
 * buildApp(options): registers plugins and routes; never listens (tests use inject, main.ts listens).
 *
 * Plugins: security headers and rate limit, form and multipart bodies, SSE, zod validation + OpenAPI,
 * handlebars views, one error handler, static assets. State: the database (data folder), the demo
 * catalogue (scenarios folder) and the worker pool for evaluations; all closed with the app.
 */
import Fastify, { type FastifyInstance } from 'fastify';
import formbody from '@fastify/formbody';
import multipart from '@fastify/multipart';
import fastifyStatic from '@fastify/static';
import { fastifySSE } from '@fastify/sse';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import views from './web/plugins/views.ts';
import security from './web/plugins/security.ts';
import errors, { frameworkErrors } from './web/plugins/errors.ts';
import openapi from './web/plugins/openapi.ts';
import jsonBody from './web/plugins/json-body.ts';
import { openStore, type StoreOptions } from './web/store.ts';
import { loadDemos, makeCatalogue } from './web/catalogue.ts';
import { makeJobRunner } from './web/jobs.ts';
import { makeBriefingJobs } from './web/briefings.ts';
import { makePoolRunner, defaultThreadCount } from './jobs/pool-runner.ts';
import type { TaskRunner } from './jobs/task-runner.ts';
import { makeStreamGate, DEFAULT_STREAM_LIMITS, type StreamLimits } from './web/streams.ts';
import { DEFAULT_LIMITS, type WebLimits } from './web/limits.ts';
import scenarioPages from './web/routes/scenario-pages.ts';
import runPages from './web/routes/run-pages.ts';
import resultPages from './web/routes/result-pages.ts';
import referencePages from './web/routes/reference-pages.ts';
import apiRoutes from './web/routes/api.ts';
import fitPages from './web/routes/fit-pages.ts';
import type { WebDeps } from './web/deps.ts';
import landscapePages from './web/landscape-pages.ts';
import { loadLandscapeDemos } from './web/landscape-catalogue.ts';
import { makeLandscapeJobs } from './web/landscape-jobs.ts';
import { MAX_MAP_FILE_BYTES } from './model/landscape.ts';

export interface AppOptions {
  /** Folder of demo scenario files (read once at start). */
  scenariosDir?: string;
  /** Folder for the database; created on first start. Default ./data. */
  dataDir?: string;
  logger?: boolean;
  /** Limits of this server (cells, horizon, options, wall time, queue). */
  limits?: Partial<WebLimits>;
  /** Evaluations computed at the same time (the rest wait in order). Default: the runner's concurrency. */
  workerThreads?: number;
  /**
   * Worker threads of this process's one pool (every evaluation's runs and ensemble draws share them).
   * Default: the CPU count. Ignored when `runner` is given.
   */
  ensembleThreads?: number;
  /**
   * Where the work runs: a queue runner (REDIS_URL) or any other TaskRunner. Default: a local pool of
   * `ensembleThreads` threads, closed with the app (a runner passed in is the caller's to close).
   */
  runner?: TaskRunner;
  /** Caps on open progress streams. */
  streamLimits?: Partial<StreamLimits>;
  /** Longest time shutdown waits for running work to stop before leaving it for the next start [ms]. */
  shutdownGraceMs?: number;
  /** Compute requests (evaluations) per client per minute. */
  computePerMinute?: number;
  /** Form posts and scenario writes per client per minute. */
  formPerMinute?: number;
  /** Free-space threshold and (for tests) a database size cap: see StoreOptions in web/store.ts. */
  storage?: StoreOptions;
  /** Host names besides 127.0.0.1, localhost and ::1 that requests may be addressed to (see security.ts). */
  allowedHosts?: readonly string[];
  /** Largest request body [bytes]. */
  bodyLimit?: number;
  /** Cache compiled templates (default true; false reloads templates on every request). */
  cacheTemplates?: boolean;
  /** Largest uploaded landscape scenario or map file [bytes]; default the map loader's limit (tests lower it). */
  landscapeUploadBytes?: number;
}

export const DEFAULT_SCENARIOS_DIR = fileURLToPath(new URL('../scenarios/', import.meta.url));
export const ASSETS_DIR = fileURLToPath(new URL('./web/assets/', import.meta.url));
/** Default request body limit [bytes]: a scenario of hundreds of segments is well below it. */
export const DEFAULT_BODY_LIMIT = 1_048_576;
export const DEFAULT_COMPUTE_PER_MINUTE = 30;
/** Form posts per client per minute: four a second for a minute, far beyond a person clicking row buttons. */
export const DEFAULT_FORM_PER_MINUTE = 240;

export async function buildApp(options: AppOptions = {}): Promise<FastifyInstance> {
  const bodyLimit = options.bodyLimit ?? DEFAULT_BODY_LIMIT;
  const app: FastifyInstance = Fastify({
    logger: options.logger ?? false,
    bodyLimit,
    return503OnClosing: true,
    // A malformed or over-long address, answered by the router: same error body or page as other errors.
    frameworkErrors: (err, req, reply) => frameworkErrors(err, req, reply, (name, data) => app.view(name, data)),
  });
  const limits: WebLimits = { ...DEFAULT_LIMITS, ...options.limits };
  // Throws DataDirError (one message naming DATA_DIR) when the folder cannot be written.
  const store = openStore(options.dataDir ?? join(process.cwd(), 'data'), options.storage);
  const demos = loadDemos(options.scenariosDir ?? DEFAULT_SCENARIOS_DIR, (msg) => app.log.warn(msg));
  const ownRunner = !options.runner;
  const runner = options.runner ?? makePoolRunner({ threads: options.ensembleThreads ?? defaultThreadCount() });
  const jobs = makeJobRunner({
    store,
    runner,
    concurrency: options.workerThreads ?? runner.concurrency,
    wallSeconds: limits.wallSeconds,
    maxQueued: limits.maxQueued,
    onError: (err) => app.log.error({ err }, 'evaluation failed'),
    log: (msg) => app.log.info(msg),
  });
  const briefings = makeBriefingJobs({
    store,
    onError: (err) => app.log.error({ err }, 'briefing failed'),
    log: (msg) => app.log.info(msg),
  });
  const landscapeJobs = makeLandscapeJobs({
    jobs: store.jobs,
    wallSeconds: limits.wallSeconds,
    maxQueued: limits.maxQueued,
    onError: (err) => app.log.error({ err }, 'map evaluation failed'),
    log: (msg) => app.log.info(msg),
  });
  // Before the listener closes: no new work, progress streams ended (they would hold the close), compute stopped.
  app.addHook('preClose', async () => {
    await jobs.shutdown(options.shutdownGraceMs);
  });
  app.addHook('onClose', async () => {
    await Promise.all([jobs.close(), briefings.close(), landscapeJobs.close(), ownRunner ? runner.close() : Promise.resolve()]);
    store.close();
  });

  const computePerMinute = options.computePerMinute ?? DEFAULT_COMPUTE_PER_MINUTE;
  await app.register(security, { computePerMinute, allowedHosts: options.allowedHosts });
  await app.register(jsonBody);
  await app.register(formbody, { bodyLimit });
  await app.register(multipart, { limits: { fileSize: bodyLimit, files: 1, fields: 10, parts: 12 } });
  await app.register(fastifySSE, { heartbeatInterval: 15_000 });
  await app.register(openapi);
  await app.register(views, { production: options.cacheTemplates ?? true });
  await app.register(errors);
  await app.register(fastifyStatic, { root: ASSETS_DIR, prefix: '/assets/', maxAge: '1h', index: false, list: false });

  const deps: WebDeps = {
    store,
    catalogue: makeCatalogue(demos, store),
    jobs,
    limits,
    briefings,
    streams: makeStreamGate({ ...DEFAULT_STREAM_LIMITS, ...options.streamLimits }),
    computeRateLimit: { max: computePerMinute, timeWindow: '1 minute' },
    formPost: { rateLimit: { max: options.formPerMinute ?? DEFAULT_FORM_PER_MINUTE, timeWindow: '1 minute' }, rateLimitWhat: 'form posts' },
  };
  await app.register(scenarioPages, deps);
  await app.register(runPages, deps);
  await app.register(resultPages, deps);
  await app.register(referencePages, deps);
  await app.register(apiRoutes, deps);
  await app.register(fitPages, deps);
  await app.register(landscapePages, {
    ...deps,
    landscapeDemos: loadLandscapeDemos(join(options.scenariosDir ?? DEFAULT_SCENARIOS_DIR, 'landscapes'), (msg) => app.log.warn(msg)),
    landscapeJobs,
    landscapeUploadBytes: options.landscapeUploadBytes ?? MAX_MAP_FILE_BYTES,
  });
  return app;
}
