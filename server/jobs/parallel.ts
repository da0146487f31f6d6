/**
 * An evaluation or an ensemble on a worker-thread pool of its own, closed afterwards: the analysis's
 * runner-taking functions (`evaluate`, `runEnsembleOn`) with a pool runner (pool-runner.ts). Results are put
 * back in draw order, so the numbers are identical for any pool size. These live with the jobs, not the
 * analysis: the pool's workers load the analysis's task kinds, so an analysis that made its own pool would
 * import itself round the circle.
 */
import type { Scenario } from '../model/scenario.ts';
import { makePoolRunner, defaultThreads } from './pool-runner.ts';
import { runEnsembleOn } from '../analysis/ensemble/chunks.ts';
import type { EnsembleRunOptions } from '../analysis/ensemble/ensemble.ts';
import { evaluate, type EvaluateOptions } from '../analysis/evaluate/evaluate.ts';
import type { ResultDocument, UncertaintyResult } from '../analysis/result.ts';

export { defaultThreads } from './pool-runner.ts';

export interface PoolOptions extends EnsembleRunOptions {
  /** Worker threads; the number of cores by default. */
  threads?: number;
  /** Draws per batch handed to a worker (default: about 4 batches per thread, at most 16 draws). */
  batchSize?: number;
}

/** Runs the scenario's ensemble on a worker pool. Same result as runEnsemble for the same seed. */
export async function runEnsembleParallel(scenario: Scenario, opts: PoolOptions = {}): Promise<UncertaintyResult> {
  const draws = scenario.uncertainty?.draws ?? 1;
  const runner = makePoolRunner({ threads: Math.max(1, Math.min(opts.threads ?? defaultThreads(), draws)) });
  try {
    // A pool of one thread still hands out batches (cancel acts between them), as before.
    const size = opts.batchSize ?? Math.max(1, Math.min(16, Math.ceil(draws / (4 * runner.concurrency))));
    return await runEnsembleOn(runner, scenario, { ...opts, chunkSize: size });
  } finally {
    await runner.close();
  }
}

/**
 * {@link evaluate} with the ensemble on a worker pool of `threads` threads (the cores by default), closed
 * afterwards (the CLI's way; the web server keeps one runner for the process).
 */
export async function evaluateScenarioParallel(scenario: Scenario, opts: EvaluateOptions & { threads?: number } = {}): Promise<ResultDocument> {
  if (!scenario.uncertainty) return evaluate(scenario, opts);
  const runner = makePoolRunner({ threads: Math.min(opts.threads ?? defaultThreads(), scenario.uncertainty.draws) });
  try {
    return await evaluate(scenario, { ...opts, runner });
  } finally {
    await runner.close();
  }
}
