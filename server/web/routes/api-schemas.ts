/**
 * The zod schemas of the JSON API's requests and answers that several route groups of api.ts share (the
 * OpenAPI document is generated from them). The scenario itself is the model's ScenarioSchema.
 */
import { z } from 'zod';
import { ScenarioSchema } from '../../model/scenario.ts';

export const ProblemSchema = z.object({ path: z.string(), value: z.unknown(), message: z.string() });
export const ErrorSchema = z
  .object({ error: z.string(), message: z.string(), problems: z.array(ProblemSchema), reference: z.string().optional() })
  .describe('Error: a code, a message and one problem per field (path, value found, allowed range)');
export const RefParams = z.object({ ref: z.string().min(1).max(80).describe('Scenario reference: "demo-<name>" or a saved scenario number') });
export const IdParams = z.object({ id: z.string().min(1).max(80) });
export const ScenarioOut = z.record(z.string(), z.unknown()).describe('A scenario (same schema as the request body of POST /api/scenarios)');
export const ScenarioItem = z.object({
  ref: z.string(),
  kind: z.enum(['demo', 'saved']),
  title: z.string(),
  updatedAt: z.string().optional(),
});
export const ScenarioEntry = z.object({ ref: z.string(), kind: z.enum(['demo', 'saved']), readOnly: z.boolean(), scenario: ScenarioOut });
export const JobSchema = z.object({
  id: z.string(),
  status: z.enum(['queued', 'running', 'cancelling', 'done', 'cancelled', 'failed']),
  statusText: z.string(),
  fraction: z.number(),
  percentText: z.string(),
  stage: z.string(),
  timeLeftText: z.string().describe('Estimated time left while running, in words ("about 3 min left"); empty when not known'),
  where: z.string().describe('Where the work runs ("this machine, 2 worker threads" or "N queue workers")'),
  trouble: z.string().nullable().describe('What is wrong behind the runner, if anything ("queue unavailable, retrying")'),
  resumed: z.boolean().describe('Taken up again after a server restart'),
  resumedText: z.string(),
  message: z.string(),
  problems: z.array(ProblemSchema),
  finished: z.boolean(),
  serverStopping: z.boolean().describe('The server is stopping; the evaluation is kept and resumes at its next start'),
  resultUrl: z.string().nullable().describe('Page of the result once done; the JSON is at /api/results/{resultId}'),
  resultId: z.string().nullable(),
});
export const ResultSummary = z.object({
  id: z.string(),
  scenarioRef: z.string().nullable(),
  title: z.string(),
  toolName: z.string(),
  toolVersion: z.string(),
  createdAt: z.string(),
});
export const ResultOut = ResultSummary.extend({
  scenario: ScenarioOut.describe('The exact scenario the result was computed from'),
  document: z.record(z.string(), z.unknown()).describe('The result document (fields documented in the README, "Result document")'),
});
export const EvaluationRequest = z
  .strictObject({
    scenarioRef: z.string().min(1).max(80).optional().describe('Evaluate a stored or demo scenario'),
    scenario: ScenarioSchema.optional().describe('Or evaluate this scenario (not stored as a scenario; the result keeps it)'),
  })
  .superRefine((b, ctx) => {
    if ((b.scenarioRef === undefined) === (b.scenario === undefined)) {
      ctx.addIssue({ code: 'custom', path: [], input: b, message: 'give exactly one of "scenarioRef" or "scenario"' });
    }
  });

/** Allowed range of the result-list limit, in the words of every other problem message. */
export const LIMIT_RANGE = 'must be a whole number from 1 to 500';
export const errors = { 400: ErrorSchema, 404: ErrorSchema };
