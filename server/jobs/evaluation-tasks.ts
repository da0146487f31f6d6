/**
 * The task kinds of one evaluation besides the ensemble's 'ensemble-chunk' (registered by the analysis in
 * server/analysis/ensemble/chunks.ts), so that a web job can run every stage of an evaluation on a
 * runner — off the server's thread, resumable stage by stage:
 *
 * - 'evaluation-point': the central-value analysis (baseline, each option, mosaics). For a scenario with
 *   an ensemble it is the analysis of the scenario without its uncertainty block; 'evaluation-finish' then
 *   puts the document together as the evaluate orchestrator does;
 * - 'evaluation-finish': the ensemble summary from every draw, the bypass section (which uses it) and the
 *   document header of the full scenario, in the orchestrator's order (server/analysis/evaluate/evaluate.ts).
 *
 * Results are made JSON-safe (json-safe.ts) so they keep every double across processes and on disk.
 */
import { documentHeader, evaluateScenario } from '../analysis/evaluate/evaluate.ts';
import { planEnsemble, summariseEnsemble, type DrawOutcome, type EnsemblePlan } from '../analysis/ensemble/ensemble.ts';
import { recommendWidth } from '../analysis/recommended-width.ts';
import { checkFiniteResult } from '../numerics/finite.ts';
import { ComputationError, isNonFinite } from '../analysis/finite-guard.ts';
import { analyseBypass } from '../analysis/bypass/analyse-bypass.ts';
import type { ResultDocument } from '../analysis/result.ts';
import { buildProblem } from '../problem/problem.ts';
import { resolve } from '../problem/resolve.ts';
import { canonicalJson } from '../model/canonical.ts';
import { InputError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { fromJsonSafe, toJsonSafe } from './json-safe.ts';
import { CancelledError, NO_CONTEXT, type TaskContext } from './task-runner.ts';
import { registerTask } from './tasks.ts';

export interface PointTask {
  scenario: Scenario;
}
export type PointOutcomeMessage =
  | { kind: 'done'; document: unknown }
  | { kind: 'invalid'; code: string; problems: Problem[] }
  | { kind: 'cancelled' };

/** Payload of the analysis's 'ensemble-chunk' kind: the draws `indices` of the scenario's ensemble. */
export interface ChunkTask {
  scenario: Scenario;
  indices: number[];
}

export interface FinishTask {
  scenario: Scenario;
  /** The point document (JSON-safe). */
  document: unknown;
  /** Every draw in index order (DrawOutcome[], JSON-safe or not). */
  draws: unknown;
  /** Workers that shared the draws (reported in the document). */
  threads: number;
  /** Wall time of the ensemble [ms]. */
  wallMs: number;
}

/**
 * Draws per ensemble chunk: a fixed rule of the draw count (never of the worker count), so the chunks —
 * and the queue's task ids made from them — are the same whoever computes them and after a restart.
 */
export function chunkSize(draws: number): number {
  return Math.min(16, Math.max(1, Math.ceil(draws / 32)));
}

/** The chunks of an ensemble of `draws` draws, as lists of draw indices. */
export function ensembleChunks(draws: number): number[][] {
  const size = chunkSize(draws);
  const out: number[][] = [];
  for (let from = 0; from < draws; from += size) out.push(Array.from({ length: Math.min(size, draws - from) }, (_, j) => from + j));
  return out;
}

let cachedKey = '';
let cachedPlan: EnsemblePlan | null = null;
function planOf(scenario: Scenario): EnsemblePlan {
  const key = canonicalJson(scenario);
  if (key !== cachedKey || !cachedPlan) {
    cachedPlan = planEnsemble(scenario);
    cachedKey = key;
  }
  return cachedPlan;
}

export function runPoint(task: PointTask, ctx: TaskContext = NO_CONTEXT): PointOutcomeMessage {
  try {
    const { uncertainty: _ensembleRunsSeparately, ...single } = task.scenario;
    const document = evaluateScenario(single as Scenario, {
      shouldCancel: () => ctx.shouldCancel(),
      onProgress: (f, stage) => ctx.progress(Math.min(f, 0.999), stage === 'done' ? 'central values done' : stage),
    });
    if (ctx.shouldCancel()) return { kind: 'cancelled' };
    checkFiniteResult(document); // non-finite numbers never become a verdict (numerics/finite.ts)
    return { kind: 'done', document: toJsonSafe(document) };
  } catch (e) {
    if (isNonFinite(e) && !(e instanceof InputError)) return { kind: 'invalid', code: new ComputationError(e.message).code, problems: new ComputationError(e.message).problems };
    if (e instanceof InputError) return { kind: 'invalid', code: e.code, problems: e.problems };
    throw e;
  }
}

export function runFinish(task: FinishTask, ctx: TaskContext = NO_CONTEXT): unknown {
  const single = fromJsonSafe<ResultDocument>(task.document);
  const draws = fromJsonSafe<DrawOutcome[]>(task.draws);
  const uncertainty = summariseEnsemble(task.scenario, planOf(task.scenario), draws, { status: 'completed', threads: task.threads, wallMs: task.wallMs });
  const bypass = analyseBypass(buildProblem(resolve(task.scenario)), single.options, uncertainty, () => ctx.shouldCancel());
  if (ctx.shouldCancel()) throw new CancelledError();
  const document: ResultDocument = {
    ...documentHeader(task.scenario, single.runAt),
    model: single.model,
    baseline: single.baseline,
    options: single.options,
    ...(single.mosaics?.length ? { mosaics: single.mosaics } : {}),
    uncertainty,
    ...(bypass ? { bypass } : {}),
    recommendedWidth: recommendWidth({ options: single.options, uncertainty, bypass }),
    cautions: single.cautions,
  };
  checkFiniteResult(document); // non-finite numbers never become a verdict (numerics/finite.ts)
  return toJsonSafe(document);
}

registerTask('evaluation-point', runPoint);
registerTask('evaluation-finish', runFinish);
