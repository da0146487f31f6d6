/**
 * Evaluation jobs: each evaluation runs in a worker thread (piscina pool), reports progress, can be
 * cancelled and is stopped at the wall-time limit. Finished results are saved with the exact scenario and
 * the tool version. Job state lives in memory (results are what persists).
 */
import { Piscina } from 'piscina';
import { MessageChannel } from 'node:worker_threads';
import { randomUUID } from 'node:crypto';
import { tsxLoaderUrl } from '../jobs/worker-loader.ts';
import { LimitError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import type { EvaluateOutcome, EvaluateTask } from './evaluate-worker.ts';
import type { Store } from './store.ts';

export type JobStatus = 'queued' | 'running' | 'cancelling' | 'done' | 'cancelled' | 'failed';

export interface JobView {
  id: string;
  status: JobStatus;
  /** Share of the work done, 0–1. */
  fraction: number;
  /** Short label of what is being computed. */
  stage: string;
  title: string;
  scenarioRef: string | null;
  createdAt: string;
  /** Saved result (status 'done'). */
  resultId: string | null;
  /** Why the job failed, field by field where possible (status 'failed'). */
  problems: Problem[];
  message: string;
}

export const TERMINAL: ReadonlySet<JobStatus> = new Set(['done', 'cancelled', 'failed']);

export interface JobRunnerOptions {
  store: Store;
  /** Worker threads (evaluations computed at the same time). */
  threads: number;
  /** Worker threads for the draws of one ensemble (each evaluation with ranges starts its own pool). */
  ensembleThreads: number;
  wallSeconds: number;
  maxQueued: number;
  /** Called with unexpected worker errors (logged; never shown to users). */
  onError?: (err: unknown) => void;
}

export interface JobRunner {
  /** @throws LimitError when too many evaluations are waiting */
  submit(input: { scenario: Scenario; scenarioRef: string | null }): JobView;
  get(id: string): JobView | undefined;
  /** Asks a queued or running job to stop; returns its state (undefined when unknown). */
  cancel(id: string): JobView | undefined;
  /** Resolves at the job's next change (or at once when it has finished). */
  nextChange(id: string): Promise<JobView | undefined>;
  close(): Promise<void>;
}

interface Job {
  view: JobView;
  cancelBuffer: SharedArrayBuffer;
  abort: AbortController;
  waiters: ((v: JobView) => void)[];
  hardStop?: NodeJS.Timeout;
  finishedAt?: number;
}

/** Finished jobs kept in memory for their pages (results themselves are in the database). */
const KEEP_FINISHED = 200;
/** Grace after the wall-time limit before the worker thread is terminated [ms]. */
const HARD_STOP_GRACE_MS = 15_000;

/** The tsx loader, so worker threads can load the TypeScript worker file (also under vitest): one helper for every pool. */
export { tsxLoaderUrl } from '../jobs/worker-loader.ts';

export function makeJobRunner(opts: JobRunnerOptions): JobRunner {
  const pool = new Piscina<EvaluateTask, EvaluateOutcome>({
    filename: new URL('./evaluate-worker.ts', import.meta.url).href,
    minThreads: 0,
    maxThreads: Math.max(1, opts.threads),
    idleTimeout: 60_000,
    execArgv: ['--import', tsxLoaderUrl()],
  });
  const jobs = new Map<string, Job>();

  const notify = (job: Job) => {
    const waiters = job.waiters;
    job.waiters = [];
    for (const w of waiters) w({ ...job.view });
  };
  const update = (job: Job, patch: Partial<JobView>) => {
    Object.assign(job.view, patch);
    if (TERMINAL.has(job.view.status)) {
      job.finishedAt = Date.now();
      if (job.hardStop) clearTimeout(job.hardStop);
      prune();
    }
    notify(job);
  };
  const prune = () => {
    const finished = [...jobs.values()].filter((j) => j.finishedAt !== undefined).sort((a, b) => a.finishedAt! - b.finishedAt!);
    for (const j of finished.slice(0, Math.max(0, finished.length - KEEP_FINISHED))) jobs.delete(j.view.id);
  };

  const start = (job: Job, scenario: Scenario) => {
    const { port1, port2 } = new MessageChannel();
    port1.on('message', (m: { type: 'started' } | { type: 'progress'; fraction: number; stage: string }) => {
      if (TERMINAL.has(job.view.status)) return;
      if (m.type === 'started') {
        if (job.view.status === 'queued') update(job, { status: 'running', stage: 'starting' });
        job.hardStop = setTimeout(() => job.abort.abort(), opts.wallSeconds * 1000 + HARD_STOP_GRACE_MS);
        job.hardStop.unref();
      } else {
        update(job, { fraction: Math.min(1, Math.max(0, m.fraction)), stage: m.stage });
      }
    });
    const task: EvaluateTask = { scenario, port: port2, cancelBuffer: job.cancelBuffer, wallMs: opts.wallSeconds * 1000, ensembleThreads: opts.ensembleThreads };
    pool
      .run(task, { transferList: [port2], signal: job.abort.signal })
      .then((outcome) => finish(job, scenario, outcome))
      .catch((err: unknown) => {
        if (job.abort.signal.aborted && job.view.status === 'cancelling') {
          update(job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled before it finished.' });
        } else if (job.abort.signal.aborted) {
          finish(job, scenario, { kind: 'timeout', seconds: opts.wallSeconds });
        } else {
          opts.onError?.(err);
          update(job, { status: 'failed', stage: 'failed', message: 'The evaluation failed unexpectedly; the details were logged on the server.' });
        }
      })
      .finally(() => port1.close());
  };

  const finish = (job: Job, scenario: Scenario, outcome: EvaluateOutcome) => {
    switch (outcome.kind) {
      case 'done': {
        try {
          const saved = opts.store.saveResult({ scenarioRef: job.view.scenarioRef, scenario, document: outcome.document });
          update(job, { status: 'done', fraction: 1, stage: 'done', resultId: saved.id, message: 'Finished.' });
        } catch (err) {
          opts.onError?.(err);
          update(job, { status: 'failed', stage: 'failed', message: 'The result could not be saved; the details were logged on the server.' });
        }
        return;
      }
      case 'cancelled':
        update(job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled before it finished; nothing was saved.' });
        return;
      case 'timeout':
        update(job, {
          status: 'failed',
          stage: 'stopped',
          message: `Stopped after ${outcome.seconds} s, the longest time this server spends on one evaluation.`,
          problems: [
            {
              path: 'horizonYears',
              value: scenario.horizonYears,
              message: `the evaluation needed more than the ${outcome.seconds} s wall-time limit; shorten the horizon or the transect, use fewer options or set a larger cell size`,
            },
          ],
        });
        return;
      case 'invalid':
        update(job, { status: 'failed', stage: 'failed', message: 'The scenario cannot be run as it stands.', problems: outcome.problems });
        return;
      case 'failed':
        opts.onError?.(new Error(outcome.message));
        update(job, { status: 'failed', stage: 'failed', message: 'The evaluation failed unexpectedly; the details were logged on the server.' });
        return;
    }
  };

  return {
    submit({ scenario, scenarioRef }) {
      const waiting = [...jobs.values()].filter((j) => j.view.status === 'queued').length;
      if (waiting >= opts.maxQueued) {
        // 503: the server is busy; the request itself is fine (the error handler keeps this status).
        throw Object.assign(
          new LimitError([
            { path: 'evaluations', value: `${waiting} waiting`, message: `this server queues at most ${opts.maxQueued} evaluations; try again in a few minutes` },
          ]),
          { statusCode: 503 },
        );
      }
      const job: Job = {
        view: {
          id: randomUUID(),
          status: 'queued',
          fraction: 0,
          stage: 'in the queue',
          title: scenario.title,
          scenarioRef,
          createdAt: new Date().toISOString(),
          resultId: null,
          problems: [],
          message: '',
        },
        cancelBuffer: new SharedArrayBuffer(4),
        abort: new AbortController(),
        waiters: [],
      };
      jobs.set(job.view.id, job);
      start(job, scenario);
      return { ...job.view };
    },
    get(id) {
      const job = jobs.get(id);
      return job ? { ...job.view } : undefined;
    },
    cancel(id) {
      const job = jobs.get(id);
      if (!job) return undefined;
      if (!TERMINAL.has(job.view.status)) {
        const wasQueued = job.view.status === 'queued';
        Atomics.store(new Int32Array(job.cancelBuffer), 0, 1);
        update(job, { status: 'cancelling', stage: 'stopping' });
        // A queued task has no thread yet: abort removes it from the queue.
        if (wasQueued) job.abort.abort();
      }
      return { ...job.view };
    },
    nextChange(id) {
      const job = jobs.get(id);
      if (!job) return Promise.resolve(undefined);
      if (TERMINAL.has(job.view.status)) return Promise.resolve({ ...job.view });
      return new Promise((resolve) => job.waiters.push(resolve));
    },
    async close() {
      for (const job of jobs.values()) {
        if (!TERMINAL.has(job.view.status)) Atomics.store(new Int32Array(job.cancelBuffer), 0, 1);
      }
      await pool.destroy();
      for (const job of jobs.values()) if (job.hardStop) clearTimeout(job.hardStop);
    },
  };
}
