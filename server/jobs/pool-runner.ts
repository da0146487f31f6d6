/**
 * A TaskRunner on this machine's worker threads (piscina), one task per payload. An adapter that keeps the
 * ensemble's worker pool behind the runner interface until the jobs layer's own local-pool runner replaces
 * it; it keeps the runner rules (results in payload order whatever order tasks finish in, cancel stops
 * pending tasks, results finished before a cancel still reach onResult).
 */
import { availableParallelism } from 'node:os';
import { setMaxListeners } from 'node:events';
import { Piscina } from 'piscina';
import { CancelledError, type MapOptions, type TaskKind, type TaskRunner } from './task-runner.ts';
import { workerExecArgv } from './worker-loader.ts';
import type { PoolTask } from './pool-worker.ts';

/** Number of worker threads to use by default: the cores available to this process. */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

export function makePoolRunner(opts: { threads?: number } = {}): TaskRunner {
  const threads = Math.max(1, opts.threads ?? defaultThreads());
  const pool = new Piscina({
    filename: new URL('./pool-worker.ts', import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 1000,
    execArgv: workerExecArgv(),
  });
  return {
    where: `this machine, ${threads} worker thread${threads === 1 ? '' : 's'}`,
    concurrency: threads,
    async map<P, R>(kind: TaskKind, payloads: readonly P[], o: MapOptions<R> = {}): Promise<R[]> {
      const abort = new AbortController();
      // One listener per queued task: lift the default limit of 10 (not a leak).
      setMaxListeners(0, abort.signal);
      const stop = () => abort.abort();
      if (o.signal?.aborted) throw new CancelledError();
      o.signal?.addEventListener('abort', stop, { once: true });
      const results: R[] = new Array(payloads.length);
      try {
        await Promise.all(
          payloads.map((payload, i) =>
            pool.run({ kind, payload } satisfies PoolTask, { signal: abort.signal }).then((r: R) => {
              results[i] = r;
              o.onResult?.(i, r);
            }),
          ),
        );
      } catch (e) {
        if (abort.signal.aborted) throw new CancelledError();
        throw e;
      } finally {
        o.signal?.removeEventListener('abort', stop);
      }
      return results;
    },
    close: () => pool.destroy(),
  };
}
