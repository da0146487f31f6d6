/**
 * Fitting a scenario to survey records, on the web: a page to paste or upload the records (GET/POST
 * /scenarios/:ref/fit), the fit with its chart, diagnostics and cautions, a button that saves the scenario
 * with the fitted ranges as a new scenario (POST /scenarios/:ref/fit/adopt), and the JSON route
 * POST /api/fits. The fit itself runs on a one-thread worker pool (analysis/calibration/fit-worker.ts).
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { Piscina } from 'piscina';
import { ScenarioSchema, parseScenarioText, type Scenario } from '../../model/scenario.ts';
import { InputError, type Problem } from '../../model/errors.ts';
import { SurveyRecordSchema, parseSurveyCsv, parseSurveyRecords, MAX_SURVEY_CSV_CHARS, MAX_SURVEY_RECORDS, type SurveyTable } from '../../model/survey.ts';
import { workerExecArgv } from '../../jobs/worker-loader.ts';
import type { FitTask, FitTaskResult } from '../../analysis/calibration/fit-worker.ts';
import type { CalibrationResult } from '../../analysis/calibration/fit.ts';
import { surveyFitChart } from '../../report/charts/survey-fit.ts';
import { parameterLines } from '../../report/fit-text.ts';
import { notFound } from '../plugins/errors.ts';
import { problemItems } from '../view-models/problems.ts';
import type { WebDeps } from '../deps.ts';

/** Longest a web fit may compute [s] (the command line has no limit). */
export const FIT_WALL_SECONDS = 120;

const StartSchema = z.strictObject({ fromKm: z.number(), toKm: z.number() }).describe('The stretch [km] the pest spread from at the start (default: the scenario’s infestation)');
const FitRequest = z
  .strictObject({
    scenarioRef: z.string().min(1).max(80).optional().describe('Fit a stored or demo scenario'),
    scenario: ScenarioSchema.optional().describe('Or send a whole scenario'),
    records: z.array(SurveyRecordSchema).max(MAX_SURVEY_RECORDS).optional().describe('Survey records: {year, atKm, detected, effort?}'),
    recordsCsv: z.string().max(MAX_SURVEY_CSV_CHARS).optional().describe('Or the records as CSV text (year,km,detected[,effort])'),
    start: StartSchema.optional(),
  })
  .superRefine((b, ctx) => {
    if ((b.scenarioRef === undefined) === (b.scenario === undefined)) ctx.addIssue({ code: 'custom', path: [], input: b, message: 'give exactly one of "scenarioRef" or "scenario"' });
    if ((b.records === undefined) === (b.recordsCsv === undefined)) ctx.addIssue({ code: 'custom', path: [], input: b, message: 'give exactly one of "records" or "recordsCsv"' });
  });

const n = (x: number | null | undefined, d = 3) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : Math.abs(x) >= 100 ? x.toFixed(0) : Number(x.toPrecision(d)).toString());

/** Display strings for the fit page (formatting only). */
function fitView(fit: CalibrationResult) {
  const chart = surveyFitChart(fit);
  return {
    provenance: fit.provenance,
    summary: `${fit.records.total} records (${fit.records.detections} finds) in ${fit.records.years} survey years, ${fit.records.firstYear}–${fit.records.lastYear}`,
    parameters: fit.parameters.map((p, i) => ({
      label: p.label,
      value: p.identifiable ? `${n(p.estimate)} ${p.unit}` : 'not pinned down',
      range: p.interval90 ? `${n(p.interval90[0])}–${n(p.interval90[1])} ${p.unit}` : '—',
      identifiable: p.identifiable,
      line: parameterLines(fit)[i],
      method: p.method,
    })),
    detectionChance: n(fit.model.detectionChance, 2),
    startYear: fit.model.startYear.toFixed(1),
    front: fit.front.message,
    quick: fit.quick.diffusion !== null && fit.quick.interval90 ? `${n(fit.quick.diffusion)} km²/yr (90 % range ${n(fit.quick.interval90[0])}–${n(fit.quick.interval90[1])}); ${fit.quick.note}` : fit.quick.note,
    flagged: fit.flagged.map((f) => f.sentence),
    byYear: fit.diagnostics.byYear.map((y) => {
      const fr = fit.model.fronts.find((x) => x.year === y.year);
      return { year: y.year, records: y.records, detected: y.detected, expected: y.expected.toFixed(1), front: `${n(fr?.bestKm)} km (${n(fr?.lowKm)}–${n(fr?.highKm)})` };
    }),
    largestResidual: n(fit.diagnostics.largestResidual, 2),
    runs: `${fit.model.runs} model runs, ${(fit.model.wallMs / 1000).toFixed(1)} s`,
    messages: fit.messages,
    cautions: fit.cautions,
    chart: chart ? { key: 'survey-fit', title: chart.title, hint: chart.hint, svg: chart.svg } : null,
  };
}

export default async function fitPages(app: FastifyInstance, deps: WebDeps) {
  const runFit = makeFitRunner(app);
  formRoutes(app, deps, runFit);
  apiRoute(app, deps, runFit);
}

type RunFit = (task: FitTask) => Promise<FitTaskResult>;

/** The one-thread fit pool, started at the first fit and closed with the app. */
function makeFitRunner(app: FastifyInstance): RunFit {
  let pool: Piscina | null = null;
  app.addHook('onClose', async () => {
    await pool?.destroy();
  });
  return async (task) => {
    pool ??= new Piscina({ filename: new URL('../../analysis/calibration/fit-worker.ts', import.meta.url).href, minThreads: 0, maxThreads: 1, idleTimeout: 30_000, execArgv: workerExecArgv() });
    return (await pool.run(task)) as FitTaskResult;
  };
}

function entryOr404(deps: WebDeps, ref: string) {
  const e = deps.catalogue.get(ref);
  if (!e) throw notFound(`No scenario "${ref}"`);
  return e;
}

function page(reply: FastifyReply, ref: string, scenario: Scenario, data: Record<string, unknown>, status = 200) {
  return reply.page(
    'fit',
    {
      title: `Fit to survey records — ${scenario.title}`,
      scenarioTitle: scenario.title,
      links: { page: `/scenarios/${ref}`, fit: `/scenarios/${ref}/fit`, adopt: `/scenarios/${ref}/fit/adopt` },
      infestation: `${scenario.infestation.fromKm}–${scenario.infestation.toKm} km`,
      ...data,
    },
    status,
  );
}

/** The posted fit form: the text as typed (shown again), the start stretch and the records table, or what is wrong. */
function readFitForm(body: Record<string, unknown>) {
  const text = typeof body.records === 'string' ? body.records : '';
  const form = { recordsText: text, startFrom: String(body.startFrom ?? ''), startTo: String(body.startTo ?? '') };
  const problems: Problem[] = [];
  let start: { fromKm: number; toKm: number } | undefined;
  if (form.startFrom.trim() !== '' || form.startTo.trim() !== '') {
    const a = Number(form.startFrom);
    const b = Number(form.startTo);
    if (!Number.isFinite(a) || !Number.isFinite(b) || !(b > a)) problems.push({ path: 'start', value: `${form.startFrom}–${form.startTo}`, message: 'must be two positions in km, the first smaller (or leave both empty for the infestation)' });
    else start = { fromKm: a, toKm: b };
  }
  let table: SurveyTable | undefined;
  try {
    table = parseSurveyCsv(text);
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    problems.push(...err.problems);
  }
  return { form, start, table, problems };
}

/** The fit page of a scenario: the form, the fit, and saving the fitted scenario. */
function formRoutes(app: FastifyInstance, deps: WebDeps, runFit: RunFit) {
  app.get<{ Params: { ref: string } }>('/scenarios/:ref/fit', async (req, reply) => {
    const e = entryOr404(deps, req.params.ref);
    return page(reply, e.ref, e.scenario, { recordsText: 'year,km,detected\n', problems: [] });
  });

  app.post<{ Params: { ref: string }; Body: Record<string, string> }>('/scenarios/:ref/fit', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => {
    const e = entryOr404(deps, req.params.ref);
    const { form, start, table, problems } = readFitForm((req.body ?? {}) as Record<string, unknown>);
    if (problems.length || !table) return page(reply, e.ref, e.scenario, { ...form, problems: problemItems(problems) }, 400);
    const r = await runFit({ scenario: e.scenario, table, start, wallSeconds: Math.min(FIT_WALL_SECONDS, deps.limits.wallSeconds) });
    if (!r.ok) return page(reply, e.ref, e.scenario, { ...form, problems: problemItems(r.problems) }, 400);
    return page(reply, e.ref, e.scenario, { ...form, problems: [], fit: fitView(r.fit), adoptedText: JSON.stringify(r.adopted) });
  });

  app.post<{ Params: { ref: string }; Body: Record<string, string> }>('/scenarios/:ref/fit/adopt', async (req, reply) => {
    const e = entryOr404(deps, req.params.ref);
    const text = typeof (req.body as Record<string, unknown>)?.scenario === 'string' ? (req.body as Record<string, string>).scenario : '';
    let scenario: Scenario;
    try {
      scenario = parseScenarioText(text);
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      return page(reply, e.ref, e.scenario, { recordsText: '', problems: problemItems(err.problems) }, 400);
    }
    const saved = deps.store.createScenario({ ...scenario, title: scenario.title.endsWith('(fitted)') ? scenario.title : `${scenario.title.slice(0, 290)} (fitted)` });
    return reply.redirect(`/scenarios/${saved.id}?saved=1`, 303);
  });
}

/** POST /api/fits: the same fit as JSON. */
function apiRoute(app: FastifyInstance, deps: WebDeps, runFit: RunFit) {
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.post(
    '/api/fits',
    {
      config: { rateLimit: deps.computeRateLimit },
      schema: {
        tags: ['fits'],
        summary: 'Fit a scenario’s movement rate (and ranges) to survey records',
        description:
          'Answers 200 with `fit` (fitted values, 90 % ranges, identifiability, flagged records, diagnostics, provenance, cautions) and `scenario` ' +
          '(the scenario with the fitted ranges adopted as its distributions). Records that cannot be fitted answer 400 naming the record and field.',
        body: FitRequest,
      },
    },
    async (req) => {
      const b = req.body as z.infer<typeof FitRequest>;
      const scenario = b.scenarioRef !== undefined ? entryOr404(deps, b.scenarioRef).scenario : (b.scenario as Scenario);
      const table = b.recordsCsv !== undefined ? parseSurveyCsv(b.recordsCsv) : parseSurveyRecords(b.records);
      const r = await runFit({ scenario, table, start: b.start, wallSeconds: Math.min(FIT_WALL_SECONDS, deps.limits.wallSeconds) });
      if (!r.ok) throw new InputError(r.code, r.problems);
      return { fit: r.fit, scenario: r.adopted };
    },
  );
}
