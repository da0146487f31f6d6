/**
 * The one interface through which the analysis hands out work it can split: chunks of ensemble draws,
 * independent option runs, the runs of a width bisection. The analysis never knows where the work runs —
 * on this thread (inline), on this machine's worker threads (local pool) or on queue workers on other
 * machines (distributed). The entries (server/main.ts, server/cli.ts, a queue worker) choose the runner
 * and pass it in.
 *
 * Rules every runner keeps, so that results never depend on where they were computed:
 * - a task's result depends only on its kind and payload (seeds follow the draw index, never the worker);
 * - `map` resolves with results in payload order, whatever order tasks finish in;
 * - payloads and results are plain JSON-serialisable data (they may cross threads, processes, machines);
 * - cancel (the signal) stops pending tasks and asks running ones to stop; results that finished before
 *   the cancel are still reported through `onResult`.
 */

/** Names of the task kinds a runner can execute (handlers are registered in server/jobs/tasks.ts). */
export type TaskKind = string;

export interface MapOptions<R> {
  /** Aborting stops pending tasks and asks running ones to stop; `map` then rejects with a CancelledError. */
  signal?: AbortSignal;
  /** Called as each task finishes (any order), with its payload index and result. */
  onResult?: (index: number, result: R) => void;
  /**
   * A stable name for this batch of work (e.g. scenario fingerprint + purpose). A distributed runner
   * derives task ids from it and the payload index, so a retried or resubmitted batch is idempotent.
   */
  key?: string;
  /**
   * Stable names of the tasks, one per payload (e.g. fingerprint + chunk index when only the missing chunks
   * of a batch are resubmitted). Default: `${key}:${index}`. A distributed runner uses them as job ids.
   */
  taskKeys?: readonly string[];
  /** Progress reported from inside a running task (its payload index, share done 0–1, a short label). */
  onProgress?: (index: number, fraction: number, stage: string) => void;
}

/** What a running task may ask of the runner that executes it. */
export interface TaskContext {
  /** True once the batch was cancelled (poll it in long loops; a runner may also stop the task hard). */
  shouldCancel(): boolean;
  /** Reports the share done (0–1) and a short label; runners may throttle these messages. */
  progress(fraction: number, stage: string): void;
}

/** A context that never cancels and drops progress (inline calls, tests). */
export const NO_CONTEXT: TaskContext = { shouldCancel: () => false, progress: () => {} };

/** State of the machinery behind a runner, for the run page ("queue unavailable, retrying"). */
export interface RunnerHealth {
  ok: boolean;
  /** Plain words: where the work runs now, or what is wrong and what the runner does about it. */
  message: string;
}

export interface TaskRunner {
  /** Where the work runs, in words for the run page (e.g. "this machine, 2 worker threads"). */
  readonly where: string;
  /** How many tasks can run at the same time (for choosing chunk sizes). */
  readonly concurrency: number;
  /** Runs one task per payload; resolves with the results in payload order. */
  map<P, R>(kind: TaskKind, payloads: readonly P[], opts?: MapOptions<R>): Promise<R[]>;
  /** Releases threads, connections and listeners. */
  close(): Promise<void>;
  /**
   * Optional: how many tasks of one batch can run at the same time now, and where, in words for the result
   * document ("this machine, 2 worker threads", "2 queue workers"). Default: `concurrency` threads here.
   */
  capacity?(): { tasks: number; text: string };
  /** Optional: whether the runner can take work now (a queue may be unreachable for a while). */
  health?(): RunnerHealth;
}

/**
 * Abort reason meaning "the caller goes away, the work may go on": a server shutting down aborts with it.
 * `map` still rejects at once, but a distributed runner leaves queued and running tasks in place, for the
 * restarted caller to collect (their ids are deterministic); a local runner stops them as for a cancel.
 */
export const DETACH = 'detach';

/** Thrown by `map` when its signal was aborted before every task finished. */
export class CancelledError extends Error {
  constructor(message = 'cancelled') {
    super(message);
    this.name = 'CancelledError';
  }
}

/** A task handler: pure function of its payload (may be async); the context (cancel, progress) is optional. */
export type TaskHandler<P = unknown, R = unknown> = (payload: P, ctx?: TaskContext) => R | Promise<R>;
