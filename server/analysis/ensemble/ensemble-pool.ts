/**
 * The ensemble on a worker-thread pool sized to the machine's cores: runEnsembleOn with the pool runner
 * (server/jobs/pool-runner.ts). Results are put back in draw order, so the numbers are identical for any
 * pool size.
 */
import type { Scenario } from '../../model/scenario.ts';
import { makePoolRunner, defaultThreads } from '../../jobs/pool-runner.ts';
import { runEnsembleOn } from './chunks.ts';
import type { EnsembleRunOptions } from './ensemble.ts';
import type { UncertaintyResult } from '../result.ts';

export { defaultThreads } from '../../jobs/pool-runner.ts';
export { workerExecArgv } from '../../jobs/worker-loader.ts';

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
