/**
 * Runs an ensemble on a worker-thread pool (piscina) sized to the machine's cores. Draws are handed out in
 * small batches; results are put back in draw order, so the numbers are identical for any pool size.
 * Cancel: `shouldCancel` is polled every 100 ms; pending and running batches are then aborted and the
 * draws completed so far are summarised in draw order (status 'cancelled').
 */
import { availableParallelism } from 'node:os';
import { setMaxListeners } from 'node:events';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { Scenario } from '../model/scenario.ts';
import { planEnsemble, summariseEnsemble, type DrawOutcome, type EnsembleRunOptions } from './ensemble.ts';
import type { EnsembleTask } from './ensemble-worker.ts';
import type { UncertaintyResult } from './result.ts';

export interface PoolOptions extends EnsembleRunOptions {
  /** Worker threads; the number of cores by default. */
  threads?: number;
  /** Draws per batch handed to a worker (default: about 4 batches per thread, at most 16 draws). */
  batchSize?: number;
}

/**
 * Node options for workers: TypeScript sources need the tsx loader. When the process already runs under
 * tsx its options are inherited; otherwise (e.g. inside vitest) the loader is added explicitly.
 */
export function workerExecArgv(): string[] {
  const inherited = process.execArgv;
  if (inherited.some((a) => a.includes('tsx'))) return inherited;
  const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
  return [...inherited, '--import', tsx];
}

/** Number of worker threads to use by default: the cores available to this process. */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

/** Runs the scenario's ensemble on a worker pool. Same result as runEnsemble for the same seed. */
export async function runEnsembleParallel(scenario: Scenario, opts: PoolOptions = {}): Promise<UncertaintyResult> {
  const started = performance.now();
  const plan = planEnsemble(scenario);
  const threads = Math.max(1, Math.min(opts.threads ?? defaultThreads(), plan.draws));
  const batch = opts.batchSize ?? Math.max(1, Math.min(16, Math.ceil(plan.draws / (4 * threads))));
  const pool = new Piscina({
    filename: new URL('./ensemble-worker.ts', import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 1000,
    execArgv: workerExecArgv(),
  });
  const abort = new AbortController();
  // One listener per queued batch: lift the default limit of 10 (not a leak).
  setMaxListeners(0, abort.signal);
  const outcomes: (DrawOutcome | undefined)[] = new Array(plan.draws);
  let done = 0;
  let cancelled = false;
  const timer = setInterval(() => {
    if (!cancelled && opts.shouldCancel?.()) {
      cancelled = true;
      abort.abort();
    }
  }, 100);
  try {
    const tasks: Promise<void>[] = [];
    for (let start = 0; start < plan.draws; start += batch) {
      const indices = Array.from({ length: Math.min(batch, plan.draws - start) }, (_, j) => start + j);
      const task: EnsembleTask = { scenario, indices };
      tasks.push(
        pool.run(task, { signal: abort.signal }).then(
          (res: DrawOutcome[]) => {
            for (const d of res) outcomes[d.index] = d;
            done += res.length;
            opts.onProgress?.(done / plan.draws, `ensemble draw ${done}/${plan.draws}`);
          },
          (e: unknown) => {
            if (!cancelled) throw e;
          },
        ),
      );
    }
    await Promise.all(tasks);
  } finally {
    clearInterval(timer);
    await pool.destroy();
  }
  // After a cancel keep every completed draw, in draw order (batches may finish out of order).
  const kept = outcomes.filter((d): d is DrawOutcome => d !== undefined);
  return summariseEnsemble(scenario, plan, kept, {
    status: cancelled && kept.length < plan.draws ? 'cancelled' : 'completed',
    threads,
    wallMs: performance.now() - started,
  });
}
