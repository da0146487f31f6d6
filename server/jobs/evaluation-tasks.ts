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
import { drawScenario, planEnsemble, summariseEnsemble, type DrawOutcome, type EnsemblePlan } from '../analysis/ensemble/ensemble.ts';
import { plannedPointRuns } from '../analysis/evaluate/planned-runs.ts';
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
  /** Where the draws ran, in words (reported in the document). */
  ranOn?: string;
  /** Wall time of the ensemble [ms]. */
  wallMs: number;
}

/** Seconds one queue or pool task should take: long enough that the hand-over (~1–2 ms) is lost in it. */
export const TARGET_TASK_SECONDS = 1;
/**
 * Fewest chunks an ensemble is cut into (when it has that many draws), so that the last chunks still
 * spread over the workers: with N workers the idle tail at the end is at most about N/MIN_CHUNKS of the run.
 */
export const MIN_CHUNKS = 32;
/**
 * Computing rate of one thread of a typical machine [cell-steps per second] and the set-up cost of one run
 * [s], for the cost estimate below. Measured on the development machine (2 cores, 2026): 1000 baseline
 * draws of 320 cells × 400 steps took 3.5 s on one thread, ≈ 37 M cell-steps/s; taken lower so that the
 * estimate errs towards longer draws, i.e. smaller chunks.
 */
const CELL_STEPS_PER_SECOND = 30e6;
const SECONDS_PER_RUN = 3e-4;
/**
 * What one option costs in a draw, in full option-layout runs at the rate above (window, pinning and
 * past-horizon runs, steady states; with per-draw critical widths the bisection). Fitted on the development
 * machine: small test transect with one 300 m option, 94 ms per draw without per-draw critical widths and
 * 127 ms with; the demo transport-decides.json, 0.45 s per draw. The estimate is within a factor of 2 of these.
 */
const RUNS_PER_OPTION = 70;
const RUNS_PER_OPTION_WITH_WIDTH = 110;
/** Draws sampled for the estimate (spread over the ensemble). */
const SAMPLED_DRAWS = 8;

/**
 * Estimated seconds of computing for one ensemble draw of a scenario on one thread: the cells × steps of the
 * full-layout runs of a few sampled draws (the same count as the limit check, planned-runs.ts), each option
 * run weighted by the runs an option costs in a draw. Depends on the scenario only, never on the machine's load
 * or the workers — so the chunks cut from it are the same wherever and whenever they are computed.
 */
export function estimatedDrawSeconds(scenario: Scenario): number {
  const plan = planEnsemble(scenario);
  const n = Math.min(SAMPLED_DRAWS, plan.draws);
  const perOption = (scenario.uncertainty?.criticalWidth ?? true) ? RUNS_PER_OPTION_WITH_WIDTH : RUNS_PER_OPTION;
  let total = 0;
  for (let j = 0; j < n; j++) {
    const i = Math.floor((j * plan.draws) / n);
    const runs = plannedPointRuns(drawScenario(scenario, plan, i).problem, '', false);
    const options = runs.filter((r) => r.label.startsWith('option') && !r.label.endsWith('(bypass run)'));
    const cost = (r: (typeof runs)[number]) => (r.nCells * Math.ceil(r.years / r.stepYears)) / CELL_STEPS_PER_SECOND + SECONDS_PER_RUN;
    for (const r of runs) total += cost(r) * (options.includes(r) ? perOption : 1);
  }
  return total / n;
}

/**
 * Draws per ensemble chunk: as many as take about TARGET_TASK_SECONDS by the cost estimate, but at most
 * draws / MIN_CHUNKS (so small ensembles are still shared evenly). A rule of the scenario only (never of
 * the worker count or the machine), so the chunks — and the queue's task ids made from them — are the same
 * whoever computes them and after a restart.
 */
export function chunkSize(scenario: Scenario): number {
  const draws = planEnsemble(scenario).draws;
  const byCost = Math.max(1, Math.round(TARGET_TASK_SECONDS / Math.max(1e-6, estimatedDrawSeconds(scenario))));
  return Math.max(1, Math.min(byCost, Math.floor(draws / MIN_CHUNKS)));
}

/** The chunks of a scenario's ensemble, as lists of draw indices. */
export function ensembleChunks(scenario: Scenario): number[][] {
  const draws = planEnsemble(scenario).draws;
  const size = chunkSize(scenario);
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
  const uncertainty = {
    ...summariseEnsemble(task.scenario, planOf(task.scenario), draws, { status: 'completed', threads: task.threads, wallMs: task.wallMs }),
    ...(task.ranOn ? { ranOn: task.ranOn } : {}),
  };
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
