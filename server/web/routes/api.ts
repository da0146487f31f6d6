/**
 * JSON API for scripts. Request bodies are validated with the model's zod schemas (the same as the CLI
 * and the form); the OpenAPI document at /api/openapi.json is generated from them. Bad input answers
 * 400 with `problems: [{path, value, message}]`. The schemas several route groups share are in api-schemas.ts.
 */
import type { FastifyInstance } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { ScenarioSchema, type Scenario } from '../../model/scenario.ts';
import { FIELDS, describeRange } from '../../model/fields.ts';
import { InputError, LimitError } from '../../model/errors.ts';
import { checkLimits } from '../limits.ts';
import { savedId } from '../catalogue.ts';
import { conflict, notFound } from '../plugins/errors.ts';
import { jobPayload, sendJobEvents, unknownJob } from './run-pages.ts';
import { briefingName, download } from './result-pages.ts';
import type { WebDeps } from '../deps.ts';
import { briefingNow, type BriefingJobView } from '../briefings.ts';
import { ErrorSchema, RefParams, IdParams, ScenarioItem, ScenarioEntry, JobSchema, ResultSummary, ResultOut, EvaluationRequest, LIMIT_RANGE, errors } from './api-schemas.ts';

/** Registers the JSON API (OpenAPI at /api/openapi.json), one group of routes per concern. */
export default async function apiRoutes(app: FastifyInstance, deps: WebDeps) {
  scenarioApi(app, deps);
  evaluationApi(app, deps);
  resultApi(app, deps);
  briefingApi(app, deps);
  referenceApi(app, deps);
}

/** The scenario of a reference, or a 404 naming it. */
function entryOr404(deps: WebDeps, ref: string) {
  const e = deps.catalogue.get(ref);
  if (!e) throw notFound(`Scenario "${ref}"`);
  return e;
}

/** An evaluation job's payload with its result id, or the unknown-job error. */
function withResultId(deps: WebDeps, id: string) {
  const job = deps.jobs.get(id);
  if (!job) throw unknownJob();
  return { ...jobPayload(job, deps.jobs.stopping), resultId: job.resultId };
}

/** Demo and saved scenarios: list, fetch, save, replace, delete. */
function scenarioApi(app: FastifyInstance, deps: WebDeps): void {
  const { store, catalogue } = deps;
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.get('/api/scenarios', { schema: { tags: ['scenarios'], summary: 'List demo and saved scenarios', response: { 200: z.object({ scenarios: z.array(ScenarioItem) }) } } }, async () => ({
    scenarios: catalogue.list(),
  }));

  api.post(
    '/api/scenarios',
    { config: deps.formPost, schema: { tags: ['scenarios'], summary: 'Save a new scenario', body: ScenarioSchema, response: { 201: ScenarioEntry, ...errors } } },
    async (req, reply) => {
      const saved = store.createScenario(req.body as Scenario);
      reply.code(201).header('location', `/api/scenarios/${saved.id}`);
      return { ref: String(saved.id), kind: 'saved' as const, readOnly: false, scenario: saved.scenario };
    },
  );

  api.get(
    '/api/scenarios/:ref',
    { schema: { tags: ['scenarios'], summary: 'Fetch one scenario', params: RefParams, response: { 200: ScenarioEntry, ...errors } } },
    async (req) => {
      const e = entryOr404(deps, req.params.ref);
      return { ref: e.ref, kind: e.kind, readOnly: e.readOnly, scenario: e.scenario };
    },
  );

  api.put(
    '/api/scenarios/:ref',
    {
      config: deps.formPost,
      schema: {
        tags: ['scenarios'],
        summary: 'Replace a saved scenario (demo scenarios are read-only)',
        params: RefParams,
        body: ScenarioSchema,
        response: { 200: ScenarioEntry, 409: ErrorSchema, ...errors },
      },
    },
    async (req) => {
      const e = entryOr404(deps, req.params.ref);
      const id = savedId(e.ref);
      if (e.readOnly || id === undefined) throw conflict('Demo scenarios are read-only; POST /api/scenarios saves a copy.');
      const saved = store.updateScenario(id, req.body as Scenario)!;
      return { ref: e.ref, kind: 'saved' as const, readOnly: false, scenario: saved.scenario };
    },
  );

  api.delete(
    '/api/scenarios/:ref',
    { config: deps.formPost, schema: { tags: ['scenarios'], summary: 'Delete a saved scenario', params: RefParams, response: { 204: z.undefined(), 409: ErrorSchema, ...errors } } },
    async (req, reply) => {
      const e = entryOr404(deps, req.params.ref);
      const id = savedId(e.ref);
      if (e.readOnly || id === undefined) throw conflict('Demo scenarios cannot be deleted.');
      store.deleteScenario(id);
      return reply.code(204).send();
    },
  );

}

/** Evaluations: start (202, durable job), poll, progress, cancel. */
function evaluationApi(app: FastifyInstance, deps: WebDeps): void {
  const { store, jobs, limits } = deps;
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.post(
    '/api/evaluations',
    {
      config: { rateLimit: deps.computeRateLimit },
      schema: {
        tags: ['evaluations'],
        summary: 'Start an evaluation in the background',
        description:
          'Answers 202 with the job; poll GET /api/evaluations/{id} (or listen to /api/evaluations/{id}/events) until `finished`, ' +
          'then fetch /api/results/{resultId}. Limits on cells, horizon, options and wall time answer 400 with the field concerned.',
        body: EvaluationRequest,
        response: {
          202: JobSchema,
          429: ErrorSchema,
          503: ErrorSchema.describe('The queue is full; retry after the Retry-After seconds'),
          507: ErrorSchema.describe('The disk holding the data folder is (nearly) full; nothing was started'),
          ...errors,
        },
      },
    },
    async (req, reply) => {
      const body = req.body as { scenarioRef?: string; scenario?: Scenario };
      const entry = body.scenarioRef !== undefined ? entryOr404(deps, body.scenarioRef) : undefined;
      const scenario = entry ? entry.scenario : body.scenario!;
      try {
        checkLimits(scenario, limits);
      } catch (e) {
        // A scenario sent inline sits under "scenario" in the body: name paths from there, as schema errors do.
        if (entry || !(e instanceof LimitError)) throw e;
        throw new LimitError(e.problems.map((p) => ({ ...p, path: `scenario.${p.path}` })));
      }
      store.checkSpace();
      const job = jobs.submit({ scenario, scenarioRef: entry?.ref ?? null });
      reply.code(202).header('location', `/api/evaluations/${job.id}`);
      return withResultId(deps, job.id);
    },
  );

  api.get(
    '/api/evaluations/:id',
    { schema: { tags: ['evaluations'], summary: 'State and progress of an evaluation', params: IdParams, response: { 200: JobSchema, ...errors } } },
    async (req) => withResultId(deps, req.params.id),
  );

  api.post(
    '/api/evaluations/:id/cancel',
    { schema: { tags: ['evaluations'], summary: 'Cancel an evaluation', params: IdParams, response: { 202: JobSchema, ...errors } } },
    async (req, reply) => {
      if (!jobs.cancel(req.params.id)) throw unknownJob();
      reply.code(202);
      return withResultId(deps, req.params.id);
    },
  );

  api.get(
    '/api/evaluations/:id/events',
    {
      sse: 'only',
      schema: {
        tags: ['evaluations'],
        summary: 'Progress as server-sent events',
        description: 'Events `progress` while running and one `end` when finished; data is the evaluation state as JSON.',
        params: IdParams,
      },
    },
    async (req, reply) => {
      if (!jobs.get(req.params.id)) throw unknownJob();
      await sendJobEvents(deps, req, reply, req.params.id);
    },
  );

}

/** Stored results: list, fetch, delete, the exports. */
function resultApi(app: FastifyInstance, deps: WebDeps): void {
  const { store } = deps;
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.get(
    '/api/results',
    {
      schema: {
        tags: ['results'],
        summary: 'List stored results (newest first)',
        querystring: z.object({ scenarioRef: z.string().max(80).optional(), limit: z.coerce.number({ error: LIMIT_RANGE }).int({ error: LIMIT_RANGE }).min(1, { error: LIMIT_RANGE }).max(500, { error: LIMIT_RANGE }).default(100) }),
        response: { 200: z.object({ results: z.array(ResultSummary) }), 400: ErrorSchema },
      },
    },
    async (req) => ({ results: store.listResults({ scenarioRef: req.query.scenarioRef, limit: req.query.limit }) }),
  );

  api.get(
    '/api/results/:id',
    { schema: { tags: ['results'], summary: 'A stored result with its exact scenario and tool version', params: IdParams, response: { 200: ResultOut, ...errors } } },
    async (req) => {
      const r = store.getResult(req.params.id);
      if (!r) throw notFound('This result');
      return r as unknown as z.infer<typeof ResultOut>;
    },
  );

  api.get(
    '/api/results/:id/briefing.pdf',
    {
      config: { rateLimit: deps.computeRateLimit },
      schema: {
        tags: ['results'],
        summary: 'The PDF briefing of a stored result',
        params: IdParams,
        produces: ['application/pdf'],
        response: { 200: z.any().describe('PDF file'), 404: ErrorSchema },
      },
    },
    async (req, reply) => download(reply, 'application/pdf', briefingName(req.params.id), await briefingNow(deps.briefings, req.params.id)),
  );

}

const BriefingJob = z
  .object({
    id: z.string(),
    status: z.enum(['queued', 'running', 'cancelling', 'done', 'cancelled', 'failed']),
    finished: z.boolean(),
    resultId: z.string(),
    title: z.string(),
    createdAt: z.string(),
    message: z.string(),
    resumed: z.boolean().describe('Drawn again after a server restart'),
    pdfUrl: z.string().nullable().describe('Where the PDF is, once drawn'),
  })
  .describe('A PDF briefing being drawn (a durable job: kept across server restarts)');
const briefingOut = (v: BriefingJobView) => ({
  id: v.id,
  status: v.status,
  finished: v.status === 'done' || v.status === 'failed',
  resultId: v.resultId,
  title: v.title,
  createdAt: v.createdAt,
  message: v.message,
  resumed: v.resumed > 0,
  pdfUrl: v.status === 'done' ? `/api/briefings/${v.id}/pdf` : null,
});

/** PDF briefings of stored results as durable jobs. */
function briefingApi(app: FastifyInstance, deps: WebDeps): void {
  const { store } = deps;
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.post(
    '/api/results/:id/briefings',
    {
      config: { rateLimit: deps.computeRateLimit },
      schema: {
        tags: ['results'],
        summary: 'Draw the PDF briefing of a stored result in the background',
        description: 'Answers 202 with the job (written to the database first; drawn again after a restart); poll GET /api/briefings/{id} until `finished`, then fetch `pdfUrl`. A briefing already drawn or under way for the result is reused.',
        params: IdParams,
        response: { 202: BriefingJob, 422: ErrorSchema, ...errors },
      },
    },
    async (req, reply) => {
      store.checkSpace();
      const job = deps.briefings.request(req.params.id);
      if (!job) throw notFound('This result');
      reply.code(202).header('location', `/api/briefings/${job.id}`);
      return briefingOut(job);
    },
  );

  api.get(
    '/api/briefings/:id',
    { schema: { tags: ['results'], summary: 'State of a PDF briefing job', params: IdParams, response: { 200: BriefingJob, ...errors } } },
    async (req) => {
      const job = deps.briefings.get(req.params.id);
      if (!job) throw notFound('This briefing');
      return briefingOut(job);
    },
  );

  api.get(
    '/api/briefings/:id/pdf',
    {
      schema: {
        tags: ['results'],
        summary: 'The PDF of a finished briefing job',
        params: IdParams,
        produces: ['application/pdf'],
        response: { 200: z.any().describe('PDF file'), 409: ErrorSchema, 404: ErrorSchema },
      },
    },
    async (req, reply) => {
      const job = deps.briefings.get(req.params.id);
      if (!job) throw notFound('This briefing');
      const pdf = deps.briefings.pdf(job.id);
      if (!pdf) {
        throw Object.assign(
          new InputError('BRIEFING_NOT_READY', [{ path: 'id', value: job.id, message: job.status === 'failed' ? `the briefing failed: ${job.message}` : `the briefing is ${job.status}; ask again when it is done` }]),
          { statusCode: 409 },
        );
      }
      return download(reply, 'application/pdf', briefingName(job.resultId), pdf);
    },
  );

  api.delete(
    '/api/results/:id',
    { schema: { tags: ['results'], summary: 'Delete a stored result', params: IdParams, response: { 204: z.undefined(), ...errors } } },
    async (req, reply) => {
      if (!store.deleteResult(req.params.id)) throw notFound('This result');
      return reply.code(204).send();
    },
  );

}

/** Reference: field table, limits, the OpenAPI document. */
function referenceApi(app: FastifyInstance, deps: WebDeps): void {
  const { limits } = deps;
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.get(
    '/api/fields',
    {
      schema: {
        tags: ['reference'],
        summary: 'Every physical input: label, unit, allowed and typical range, help, default and its source',
        response: { 200: z.object({ fields: z.array(z.record(z.string(), z.unknown())) }) },
      },
    },
    async () => ({
      fields: Object.entries(FIELDS).map(([key, spec]) => ({
        key,
        ...spec,
        max: Number.isFinite(spec.max) ? spec.max : null,
        allowed: describeRange(spec),
      })),
    }),
  );

  api.get(
    '/api/limits',
    {
      schema: {
        tags: ['reference'],
        summary: 'Limits of this server (cells, horizon, options, wall time, queue)',
        response: { 200: z.object({ maxCells: z.number(), maxHorizonYears: z.number(), maxOptions: z.number(), wallSeconds: z.number(), maxQueued: z.number() }) },
      },
    },
    async () => limits,
  );

  app.get('/api/openapi.json', { schema: { hide: true } }, async () => app.swagger());
}
