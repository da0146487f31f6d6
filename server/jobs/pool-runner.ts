/**
 * The local pool runner: every task of this process runs on ONE pool of worker threads (piscina), whatever
 * asked for it — the central-value runs of several evaluations and the draws of their ensembles share the
 * same thread budget, so the machine is never oversubscribed by pools inside pools.
 *
 * Cancel: the batch's shared flag is set at once (tasks poll it between and inside runs, and tasks not yet
 * started stop before they begin); a task still running CANCEL_GRACE_MS later has its thread terminated, so
 * a cancel or a wall-time stop acts within about a second whatever the grid.
 */
import { setMaxListeners } from 'node:events';
import { MessageChannel } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { CancelledError, type MapOptions, type TaskKind, type TaskRunner } from './task-runner.ts';
import type { PoolTask } from './pool-worker.ts';
import { workerExecArgv } from './worker-loader.ts';

/** Time a cancelled task gets to stop by itself before its thread is terminated [ms]. */
export const CANCEL_GRACE_MS = 400;

export interface PoolRunnerOptions {
  /** Worker threads (the process's whole budget). Default: the cores available. */
  threads?: number;
  /** Keep idle threads this long [ms] (default 30 s). */
  idleTimeoutMs?: number;
  /** Threads started at once and kept (default 0: started on demand). A queue worker keeps all of them. */
  minThreads?: number;

}

/** The cores available to this process. */
export function defaultThreadCount(): number {
  return Math.max(1, availableParallelism());
}

/** The same, under the name the analysis uses. */
export const defaultThreads = defaultThreadCount;

export interface PoolRunner extends TaskRunner {
  /** Tasks running or waiting for a thread now. */
  pending(): number;
}

/** The pool and what the runner counts of it. */
interface PoolState {
  pool: Piscina<PoolTask, unknown>;
  /** Tasks running or waiting for a thread now. */
  inFlight: number;
  closed: boolean;
}

export function makePoolRunner(opts: PoolRunnerOptions = {}): PoolRunner {
  const threads = Math.max(1, Math.floor(opts.threads ?? defaultThreadCount()));
  const pool = new Piscina<PoolTask, unknown>({
    filename: new URL('./pool-worker.ts', import.meta.url).href,
    minThreads: Math.min(threads, Math.max(0, Math.floor(opts.minThreads ?? 0))),
    maxThreads: threads,
    idleTimeout: opts.idleTimeoutMs ?? 30_000,
    execArgv: workerExecArgv(),
    // Tasks wait in the pool's queue (FIFO) for a free thread; the budget is the thread count.
    maxQueue: Infinity,
  });
  const st: PoolState = { pool, inFlight: 0, closed: false };

  return {
    where: `this machine, ${threads} worker thread${threads === 1 ? '' : 's'}`,
    concurrency: threads,
    pending: () => st.inFlight,
    capacity: () => ({ tasks: threads, text: `this machine, ${threads} worker thread${threads === 1 ? '' : 's'}` }),
    map: <P, R>(kind: TaskKind, payloads: readonly P[], o: MapOptions<R> = {}) => mapOnPool(st, kind, payloads, o),
    async close() {
      st.closed = true;
      await pool.destroy();
    },
  };
}

/** One batch on the pool: results in order; the first failure or a cancel stops the rest (see the header). */
async function mapOnPool<P, R>(st: PoolState, kind: TaskKind, payloads: readonly P[], o: MapOptions<R>): Promise<R[]> {
  if (st.closed) throw new Error('the worker pool is closed');
  if (o.signal?.aborted) throw new CancelledError();
  const cancel = new SharedArrayBuffer(4);
  const flag = new Int32Array(cancel);
  const hard = new AbortController();
  setMaxListeners(0, hard.signal); // one listener per task of the batch (not a leak)
  let hardTimer: NodeJS.Timeout | undefined;
  let failed: unknown;
  const stop = () => {
    if (Atomics.load(flag, 0) !== 0) return;
    Atomics.store(flag, 0, 1);
    hardTimer = setTimeout(() => hard.abort(), CANCEL_GRACE_MS);
    hardTimer.unref();
  };
  o.signal?.addEventListener('abort', stop, { once: true });
  const results: R[] = new Array(payloads.length);
  const runOne = async (payload: P, index: number) => {
    const task: PoolTask = { kind, payload, cancel };
    const port1 = o.onProgress ? attachProgress(task, flag, (f, stage) => o.onProgress?.(index, f, stage)) : undefined;
    st.inFlight++;
    try {
      const r = (await st.pool.run(task, { signal: hard.signal, transferList: task.port ? [task.port] : [] })) as R;
      results[index] = r;
      o.onResult?.(index, r);
    } catch (e) {
      // The first real failure stops the rest of the batch.
      if (!o.signal?.aborted && failed === undefined) {
        failed = e;
        stop();
      }
      throw e;
    } finally {
      st.inFlight--;
      (port1 as unknown as { close(): void } | undefined)?.close();
    }
  };
  try {
    const settled = await Promise.allSettled(payloads.map(runOne));
    if (o.signal?.aborted) throw new CancelledError();
    if (failed !== undefined) throw failed;
    const rejected = settled.find((s) => s.status === 'rejected') as PromiseRejectedResult | undefined;
    if (rejected) throw rejected.reason;
    return results;
  } finally {
    if (hardTimer) clearTimeout(hardTimer);
    o.signal?.removeEventListener('abort', stop);
  }
}

/**
 * Gives the task a port for its progress messages, passed on while the batch's cancel flag is not set;
 * returns the local end (closed when the task ends).
 */
function attachProgress(task: PoolTask, flag: Int32Array, onProgress: (fraction: number, stage: string) => void): MessagePort {
  const ch = new MessageChannel();
  ch.port1.on('message', (m: { fraction: number; stage: string }) => {
    if (Atomics.load(flag, 0) === 0) onProgress(m.fraction, m.stage);
  });
  task.port = ch.port2;
  return ch.port1 as unknown as MessagePort;
}
