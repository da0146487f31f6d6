/**
 * The ensemble's splittable work: chunks of draws handed to a TaskRunner as the task kind 'ensemble-chunk'
 * (registered here), and the ensemble run on any runner. Each draw depends only on the scenario, the seed
 * and its index, so any chunking over any runner gives the same numbers as one thread.
 */
import { canonicalJson } from '../../model/canonical.ts';
import type { Scenario } from '../../model/scenario.ts';
import { registerTask } from '../../jobs/tasks.ts';
import { CancelledError, NO_CONTEXT, type TaskContext, type TaskRunner } from '../../jobs/task-runner.ts';
import { evaluateDraw, planEnsemble, summariseEnsemble, type DrawOutcome, type EnsemblePlan, type EnsembleRunOptions } from './ensemble.ts';
import type { UncertaintyResult } from '../result.ts';

export const ENSEMBLE_CHUNK = 'ensemble-chunk';

export interface EnsembleChunk {
  scenario: Scenario;
  indices: number[];
}

let cachedKey = '';
let cachedPlan: EnsemblePlan | null = null;

/**
 * Evaluates the draws `indices` of the scenario's ensemble (the plan is rebuilt once per scenario and cached).
 * Cancel is polled between draws and inside each draw's runs, so a cancelled chunk stops within about one
 * time step whatever its size (a draw cut short is never returned: the chunk throws CancelledError);
 * progress is reported after each draw.
 */
export function evaluateChunk(task: EnsembleChunk, ctx: TaskContext = NO_CONTEXT): DrawOutcome[] {
  const key = canonicalJson(task.scenario);
  if (key !== cachedKey || !cachedPlan) {
    cachedPlan = planEnsemble(task.scenario);
    cachedKey = key;
  }
  const plan = cachedPlan;
  const out: DrawOutcome[] = [];
  const shouldCancel = () => ctx.shouldCancel();
  for (const i of task.indices) {
    if (shouldCancel()) throw new CancelledError();
    const d = evaluateDraw(task.scenario, plan, i, shouldCancel);
    if (shouldCancel()) throw new CancelledError();
    out.push(d);
    ctx.progress(out.length / task.indices.length, `draw ${i + 1}`);
  }
  return out;
}

registerTask(ENSEMBLE_CHUNK, evaluateChunk);

/** Draws per chunk: one on a single-thread runner (cancel between draws), else about 4 chunks per thread, at most 16 draws. */
export function chunkSize(draws: number, concurrency: number): number {
  return concurrency <= 1 ? 1 : Math.max(1, Math.min(16, Math.ceil(draws / (4 * concurrency))));
}

/**
 * Runs the scenario's ensemble on a runner: the draws go out as chunks through `runner.map('ensemble-chunk')`.
 * Cancel: `shouldCancel` is polled as chunks finish and every 100 ms; the draws completed by then are
 * summarised in draw order (status 'cancelled').
 */
export async function runEnsembleOn(runner: TaskRunner, scenario: Scenario, opts: EnsembleRunOptions & { chunkSize?: number } = {}): Promise<UncertaintyResult> {
  const started = performance.now();
  const plan = planEnsemble(scenario);
  const size = opts.chunkSize ?? chunkSize(plan.draws, runner.concurrency);
  const chunks: EnsembleChunk[] = [];
  for (let start = 0; start < plan.draws; start += size) chunks.push({ scenario, indices: Array.from({ length: Math.min(size, plan.draws - start) }, (_, j) => start + j) });
  const outcomes: (DrawOutcome | undefined)[] = new Array(plan.draws);
  const abort = new AbortController();
  const poll = () => {
    if (!abort.signal.aborted && opts.shouldCancel?.()) abort.abort();
  };
  const timer = setInterval(poll, 100);
  let done = 0;
  try {
    poll();
    await runner.map<EnsembleChunk, DrawOutcome[]>(ENSEMBLE_CHUNK, chunks, {
      signal: abort.signal,
      key: `ensemble:${plan.seed}:${plan.draws}`,
      onResult: (_, res) => {
        for (const d of res) outcomes[d.index] = d;
        done += res.length;
        opts.onProgress?.(done / plan.draws, `ensemble draw ${done}/${plan.draws}`);
        poll();
      },
    });
  } catch (e) {
    if (!(e instanceof CancelledError)) throw e;
  } finally {
    clearInterval(timer);
  }
  const kept = outcomes.filter((d): d is DrawOutcome => d !== undefined);
  return summariseEnsemble(scenario, plan, kept, {
    status: abort.signal.aborted && kept.length < plan.draws ? 'cancelled' : 'completed',
    threads: runner.concurrency,
    wallMs: performance.now() - started,
  });
}
