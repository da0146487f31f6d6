/**
 * The task kinds of one evaluation, registered for every runner (inline, local pool, queue workers):
 *
 * - 'evaluation-point': the central-value analysis (baseline, each option, mosaics) of a scenario; the
 *   ensemble, when the scenario has one, is left to the next two kinds;
 * - 'ensemble-chunk': draws `from` … `to − 1` of the scenario's ensemble (each draw depends only on the
 *   scenario, the seed and its index, so any split over tasks gives the same numbers);
 * - 'evaluation-finish': the ensemble summary and the bypass section from every draw, added to the document.
 *
 * Adapter over today's analysis functions (evaluateScenario, planEnsemble/evaluateDraw, summariseEnsemble,
 * analyseBypass), in the order evaluateScenarioParallel calls them, until the analysis's own evaluate
 * orchestrator registers these kinds itself. Results are made JSON-safe (json-safe.ts) so they keep every
 * double across processes and on disk.
 */
import { evaluateScenario } from '../analysis/evaluate.ts';
import { evaluateDraw, planEnsemble, summariseEnsemble, type DrawOutcome, type EnsemblePlan } from '../analysis/ensemble.ts';
import { analyseBypass } from '../analysis/uncertainty.ts';
import type { ResultDocument } from '../analysis/result.ts';
import { canonicalJson } from '../model/canonical.ts';
import { InputError, type Problem } from '../model/errors.ts';
import { pointScenario, type Scenario } from '../model/scenario.ts';
import { fromJsonSafe, toJsonSafe } from './json-safe.ts';
import { CancelledError, type TaskContext } from './task-runner.ts';
import { registerTask } from './tasks.ts';

export interface PointTask {
  scenario: Scenario;
}
export type PointOutcomeMessage =
  | { kind: 'done'; document: unknown }
  | { kind: 'invalid'; code: string; problems: Problem[] }
  | { kind: 'cancelled' };

export interface ChunkTask {
  scenario: Scenario;
  /** First draw index (inclusive). */
  from: number;
  /** Last draw index (exclusive). */
  to: number;
}

export interface FinishTask {
  scenario: Scenario;
  /** The point document (JSON-safe). */
  document: unknown;
  /** Every draw in index order (JSON-safe DrawOutcome[]). */
  draws: unknown;
  /** Workers that shared the draws (reported in the document). */
  threads: number;
  /** Wall time of the ensemble [ms]. */
  wallMs: number;
}

/** Draws per ensemble chunk: a fixed rule of the draw count (never of the worker count), so chunk ids are stable. */
export function chunkSize(draws: number): number {
  return Math.min(16, Math.max(1, Math.ceil(draws / 32)));
}

/** The chunks [from, to) of an ensemble of `draws` draws. */
export function ensembleChunks(draws: number): { from: number; to: number }[] {
  const size = chunkSize(draws);
  const out: { from: number; to: number }[] = [];
  for (let from = 0; from < draws; from += size) out.push({ from, to: Math.min(draws, from + size) });
  return out;
}

let cachedKey = '';
let cachedPlan: EnsemblePlan | null = null;
/** The ensemble plan of a scenario (the Latin hypercube is rebuilt once per scenario and thread). */
function planOf(scenario: Scenario): EnsemblePlan {
  const key = canonicalJson(scenario);
  if (key !== cachedKey || !cachedPlan) {
    cachedPlan = planEnsemble(scenario);
    cachedKey = key;
  }
  return cachedPlan;
}

export function runPoint(task: PointTask, ctx: TaskContext): PointOutcomeMessage {
  try {
    const document = evaluateScenario(task.scenario, {
      ensemble: 'skip',
      shouldCancel: () => ctx.shouldCancel(),
      onProgress: (f, stage) => ctx.progress(Math.min(f, 0.999), stage === 'done' ? 'central values done' : stage),
    });
    if (ctx.shouldCancel()) return { kind: 'cancelled' };
    return { kind: 'done', document: toJsonSafe(document) };
  } catch (e) {
    if (e instanceof InputError) return { kind: 'invalid', code: e.code, problems: e.problems };
    throw e;
  }
}

export function runChunk(task: ChunkTask, ctx: TaskContext): unknown {
  const plan = planOf(task.scenario);
  const out: DrawOutcome[] = [];
  for (let i = task.from; i < task.to; i++) {
    let cancelled = ctx.shouldCancel();
    if (!cancelled) {
      const d = evaluateDraw(task.scenario, plan, i, () => (cancelled = ctx.shouldCancel()));
      if (!cancelled) out.push(d);
    }
    // A chunk is all or nothing: a partial chunk must never be stored as finished.
    if (cancelled) throw new CancelledError();
    ctx.progress((i + 1 - task.from) / (task.to - task.from), `draw ${i + 1}`);
  }
  return toJsonSafe(out);
}

export function runFinish(task: FinishTask, ctx: TaskContext): unknown {
  const doc = fromJsonSafe<ResultDocument>(task.document);
  const draws = fromJsonSafe<DrawOutcome[]>(task.draws);
  const plan = planOf(task.scenario);
  const uncertainty = summariseEnsemble(task.scenario, plan, draws, { status: 'completed', threads: task.threads, wallMs: task.wallMs });
  const bypass = analyseBypass(pointScenario(task.scenario), doc.options, uncertainty, () => ctx.shouldCancel());
  if (ctx.shouldCancel()) throw new CancelledError();
  const { cautions, ...rest } = doc;
  return toJsonSafe({ ...rest, uncertainty, ...(bypass ? { bypass } : {}), cautions });
}

registerTask('evaluation-point', runPoint);
registerTask('ensemble-chunk', runChunk);
registerTask('evaluation-finish', runFinish);
