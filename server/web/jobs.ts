/**
 * Web jobs: durable evaluations on a task runner (the local pool or queue workers).
 *
 * - Every accepted evaluation is written to the database before the server answers 202 (job-store.ts);
 *   its finished pieces (central values, each chunk of ensemble draws) are stored as they finish.
 * - On start, jobs left queued or running are taken up again ("resumed after a restart"): an ensemble
 *   continues from its stored chunks, so the numbers are those of an uninterrupted run.
 * - Cancel and the wall-time limit abort the job's tasks; the runner stops them within about a second.
 * - Shutdown (SIGTERM) takes no new work, ends every progress stream, stops the computing within a bounded
 *   time and lists what was not finished: those jobs stay queued in the database and resume at the next start.
 *
 * Job state is in memory while the job lives and in the database always, so a job's page keeps working
 * after a restart.
 *
 * Longer than 400 lines on purpose: `makeJobRunner` is one closure that owns the in-memory job table, the
 * store and the runner; its parts (accept, resume, progress streams, cancel, wall-time limit, shutdown)
 * change the same state and are easier to check for races side by side.
 */
import { randomUUID } from 'node:crypto';
import { LimitError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { CancelledError, DETACH, type TaskRunner } from '../jobs/task-runner.ts';
import { runEvaluation } from '../jobs/evaluation-job.ts';
import { parseSafe, stringifySafe } from '../jobs/json-safe.ts';
import type { StoredJob } from './job-store.ts';
import { longRunProblem } from './run-cost.ts';
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
  /** Taken up again after a server restart (how many times). */
  resumed: number;
  /** Evaluations running now ahead of this queued one (0 when it is about to start). */
  ahead: number;
  /** Estimated seconds left (running jobs with enough progress to tell), else null. */
  secondsLeft: number | null;
  /** Where the work runs, in words ("this machine, 2 worker threads" / "3 queue workers"). */
  where: string;
  /** What is wrong with the machinery behind the runner, if anything ("queue unavailable, retrying"). */
  trouble: string | null;
}

/** The tsx loader, so worker threads can load TypeScript files (briefings use it). */
export { tsxLoaderUrl } from '../jobs/worker-loader.ts';

export const TERMINAL: ReadonlySet<JobStatus> = new Set(['done', 'cancelled', 'failed']);

export interface JobRunnerOptions {
  store: Store;
  /** Where tasks run (local pool or queue). */
  runner: TaskRunner;
  /** Evaluations computed at the same time (the rest wait in order). */
  concurrency: number;
  wallSeconds: number;
  maxQueued: number;
  /** Called with unexpected errors (logged; never shown to users). */
  onError?: (err: unknown) => void;
  /** Informational messages (resumed jobs, shutdown summary). */
  log?: (message: string) => void;
}

export interface ShutdownReport {
  /** Jobs that were running or waiting: kept in the database, resumed at the next start. */
  unfinished: { id: string; title: string; status: JobStatus; fraction: number }[];
}

export interface JobRunner {
  /** @throws LimitError when too many evaluations are waiting, or the server is stopping (503) */
  submit(input: { scenario: Scenario; scenarioRef: string | null }): JobView;
  get(id: string): JobView | undefined;
  /** Asks a queued or running job to stop; returns its state (undefined when unknown). */
  cancel(id: string): JobView | undefined;
  /** Resolves at the job's next change (or at once when it has finished or the server stops). */
  nextChange(id: string): Promise<JobView | undefined>;
  /** True once shutdown began (streams end, no new work). */
  readonly stopping: boolean;
  /** Stops taking work, ends streams, stops compute within `graceMs`, reports what was not finished. */
  shutdown(graceMs?: number): Promise<ShutdownReport>;
  close(): Promise<void>;
}

interface Job {
  view: Omit<JobView, 'ahead' | 'secondsLeft' | 'where' | 'trouble'>;
  scenario: Scenario;
  abort?: AbortController;
  stopReason?: 'cancel' | 'timeout' | 'shutdown';
  waiters: ((v: JobView | undefined) => void)[];
  /** When the current attempt started [ms] and the fraction done then (for the time left). */
  attemptStart?: number;
  attemptFraction?: number;
  lastSaved?: number;
  done?: Promise<void>;
}

/** Finished jobs kept in memory (older ones are read from the database). */
const KEEP_IN_MEMORY = 100;
/** Finished jobs kept in the database for their pages. */
const KEEP_IN_DATABASE = 500;
/** Shortest interval between two progress writes of one job to the database [ms]. */
const SAVE_INTERVAL_MS = 2_000;
/** Default time shutdown waits for running tasks to stop [ms]. */
export const SHUTDOWN_GRACE_MS = 3_000;

export function makeJobRunner(opts: JobRunnerOptions): JobRunner {
  const { store, runner } = opts;
  const jobs = new Map<string, Job>();
  const waiting: Job[] = [];
  let running = 0;
  let stopping = false;

  const runningIds = () => [...jobs.values()].filter((j) => j.view.status === 'running' || j.view.status === 'cancelling');

  const view = (job: Job): JobView => {
    const ahead = job.view.status === 'queued' ? Math.max(0, waiting.indexOf(job)) + (running >= opts.concurrency ? running : 0) : 0;
    let secondsLeft: number | null = null;
    if (job.view.status === 'running' && job.attemptStart !== undefined) {
      const elapsed = (Date.now() - job.attemptStart) / 1000;
      const gained = job.view.fraction - (job.attemptFraction ?? 0);
      if (elapsed >= 1 && gained >= 0.01) secondsLeft = Math.max(0, (elapsed * (1 - job.view.fraction)) / gained);
    }
    const health = runner.health?.();
    return { ...job.view, problems: [...job.view.problems], ahead, secondsLeft, where: runner.where, trouble: health && !health.ok ? health.message : null };
  };
  const fromRow = (r: StoredJob): JobView => ({
    id: r.id,
    status: r.status,
    fraction: r.fraction,
    stage: r.stage,
    title: r.title,
    scenarioRef: r.scenarioRef,
    createdAt: r.createdAt,
    resultId: r.resultId,
    problems: r.problems,
    message: r.message,
    resumed: r.resumed,
    ahead: 0,
    secondsLeft: null,
    where: runner.where,
    trouble: null,
  });

  const notify = (job: Job) => {
    const ws = job.waiters;
    job.waiters = [];
    const v = view(job);
    for (const w of ws) w(v);
  };
  const persist = (job: Job, force: boolean) => {
    const now = Date.now();
    if (!force && job.lastSaved !== undefined && now - job.lastSaved < SAVE_INTERVAL_MS) return;
    job.lastSaved = now;
    const v = job.view;
    try {
      store.jobs.update(v.id, {
        status: v.status,
        fraction: v.fraction,
        stage: v.stage,
        message: v.message,
        problems: v.problems,
        resultId: v.resultId,
        resumed: v.resumed,
        finishedAt: TERMINAL.has(v.status) ? new Date().toISOString() : null,
      });
    } catch (err) {
      opts.onError?.(err);
    }
  };
  const update = (job: Job, patch: Partial<Job['view']>, force = true) => {
    Object.assign(job.view, patch);
    persist(job, force || TERMINAL.has(job.view.status));
    if (TERMINAL.has(job.view.status)) prune();
    notify(job);
  };
  const prune = () => {
    const finished = [...jobs.values()].filter((j) => TERMINAL.has(j.view.status));
    for (const j of finished.slice(0, Math.max(0, finished.length - KEEP_IN_MEMORY))) jobs.delete(j.view.id);
    try {
      store.jobs.prune(KEEP_IN_DATABASE);
    } catch (err) {
      opts.onError?.(err);
    }
  };

  const pump = () => {
    while (!stopping && running < opts.concurrency && waiting.length) {
      const job = waiting.shift()!;
      if (job.view.status !== 'queued') continue;
      running++;
      job.done = run(job).finally(() => {
        running--;
        pump();
      });
      for (const w of waiting) notify(w);
    }
  };

  const run = async (job: Job) => {
    const abort = new AbortController();
    job.abort = abort;
    job.attemptStart = Date.now();
    job.attemptFraction = job.view.fraction;
    update(job, { status: 'running', stage: job.view.resumed ? 'taking up again after the restart' : 'starting' });
    // The wall-time limit counts computing, from the first sign of it (a task reporting progress or a
    // result), not the wait for a free thread or queue worker.
    let wall: NodeJS.Timeout | undefined;
    const computing = () => {
      if (wall || abort.signal.aborted) return;
      wall = setTimeout(() => {
        job.stopReason ??= 'timeout';
        abort.abort();
      }, opts.wallSeconds * 1000);
      wall.unref();
    };
    const id = job.view.id;
    try {
      const point = store.jobs.point(id);
      const chunks = new Map([...store.jobs.chunks(id)].map(([k, t]) => [k, parseSafe(t)]));
      const out = await runEvaluation(job.scenario, runner, {
        signal: abort.signal,
        checkpoint: { point: point === undefined ? undefined : parseSafe(point), chunks },
        onPoint: (d) => {
          computing();
          store.jobs.savePoint(id, stringifySafe(d));
        },
        onChunk: (k, d) => {
          computing();
          store.jobs.saveChunk(id, k, stringifySafe(d));
        },
        onProgress: (fraction, stage) => {
          computing();
          if (job.view.status === 'running') update(job, { fraction, stage }, false);
        },
      });
      if (abort.signal.aborted) throw new CancelledError();
      if (out.kind === 'invalid') {
        update(job, { status: 'failed', stage: 'failed', message: 'The scenario cannot be run as it stands.', problems: out.problems });
      } else {
        try {
          const saved = store.saveResult({ scenarioRef: job.view.scenarioRef, scenario: job.scenario, document: out.document });
          update(job, { status: 'done', fraction: 1, stage: 'done', resultId: saved.id, message: 'Finished.' });
        } catch (err) {
          opts.onError?.(err);
          update(job, { status: 'failed', stage: 'failed', message: 'The result could not be saved; the details were logged on the server.' });
        }
      }
    } catch (err) {
      if (abort.signal.aborted || err instanceof CancelledError) {
        stopped(job);
      } else {
        opts.onError?.(err);
        update(job, { status: 'failed', stage: 'failed', message: 'The evaluation failed unexpectedly; the details were logged on the server.' });
      }
    } finally {
      if (wall) clearTimeout(wall);
      job.abort = undefined;
      if (TERMINAL.has(job.view.status)) {
        try {
          store.jobs.clearCheckpoint(id);
        } catch (err) {
          opts.onError?.(err);
        }
      }
    }
  };

  /** A job whose tasks were aborted: cancelled, timed out, or interrupted by shutdown (kept for resuming). */
  const stopped = (job: Job) => {
    const at = Math.round(100 * job.view.fraction);
    switch (job.stopReason) {
      case 'timeout':
        update(job, {
          status: 'failed',
          stage: 'stopped',
          message: `Stopped after ${opts.wallSeconds} s, the longest time this server spends on one evaluation (${at} % done).`,
          problems: [longRunProblem(job.scenario, opts.wallSeconds)],
        });
        return;
      case 'shutdown':
        // Back to the queue in the database: the next start takes it up again.
        Object.assign(job.view, { status: 'queued', stage: 'waiting for the server to start again' });
        persist(job, true);
        notify(job);
        return;
      default:
        update(job, { status: 'cancelled', stage: 'cancelled', message: `Cancelled at ${at} %; nothing was saved.` });
    }
  };

  const enqueue = (job: Job) => {
    jobs.set(job.view.id, job);
    waiting.push(job);
    pump();
  };

  // Take up what an earlier run of the server left queued or running.
  for (const r of store.jobs.unfinished('evaluation')) {
    const { ahead: _a, secondsLeft: _s, where: _w, trouble: _t, ...rowView } = fromRow(r);
    const job: Job = { view: rowView, scenario: r.scenario, waiters: [] };
    if (r.status === 'cancelling') {
      jobs.set(r.id, job);
      update(job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled; the server restarted before it stopped. Nothing was saved.' });
      continue;
    }
    const resumed = r.resumed + 1;
    Object.assign(job.view, { status: 'queued', stage: 'waiting for a free worker', resumed });
    persist(job, true);
    opts.log?.(`resuming evaluation ${r.id} ("${r.title}", ${Math.round(100 * r.fraction)} % done before the restart)`);
    enqueue(job);
  }

  return {
    get stopping() {
      return stopping;
    },
    submit({ scenario, scenarioRef }) {
      if (stopping) {
        throw Object.assign(
          new LimitError([{ path: 'evaluations', value: 'server stopping', message: 'this server is stopping; try again when it is back' }]),
          { statusCode: 503 },
        );
      }
      const queued = waiting.filter((j) => j.view.status === 'queued').length;
      if (queued >= opts.maxQueued) {
        // 503: the server is busy; the request itself is fine (the error handler keeps this status).
        throw Object.assign(
          new LimitError([
            { path: 'evaluations', value: `${queued} waiting`, message: `this server queues at most ${opts.maxQueued} evaluations; try again in a few minutes` },
          ]),
          { statusCode: 503 },
        );
      }
      const job: Job = {
        view: {
          id: randomUUID(),
          status: 'queued',
          fraction: 0,
          stage: 'waiting for a free worker',
          title: scenario.title,
          scenarioRef,
          createdAt: new Date().toISOString(),
          resultId: null,
          problems: [],
          message: '',
          resumed: 0,
        },
        scenario,
        waiters: [],
      };
      // Durable before the answer: a failed write refuses the job (the caller's error handler answers).
      store.jobs.insert({ ...job.view, kind: 'evaluation', scenario, finishedAt: null });
      job.lastSaved = Date.now();
      enqueue(job);
      return view(job);
    },
    get(id) {
      const job = jobs.get(id);
      if (job) return view(job);
      const row = store.jobs.get(id);
      return row ? fromRow(row) : undefined;
    },
    cancel(id) {
      const job = jobs.get(id);
      if (!job) {
        const row = store.jobs.get(id);
        return row ? fromRow(row) : undefined;
      }
      if (!TERMINAL.has(job.view.status)) {
        if (job.view.status === 'queued') {
          const i = waiting.indexOf(job);
          if (i >= 0) waiting.splice(i, 1);
          update(job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled before it started; nothing was saved.' });
          try {
            store.jobs.clearCheckpoint(id);
          } catch (err) {
            opts.onError?.(err);
          }
        } else {
          job.stopReason ??= 'cancel';
          update(job, { status: 'cancelling', stage: 'stopping' });
          job.abort?.abort();
        }
      }
      return view(job);
    },
    nextChange(id) {
      const job = jobs.get(id);
      if (!job) return Promise.resolve(this.get(id));
      if (TERMINAL.has(job.view.status) || stopping) return Promise.resolve(view(job));
      return new Promise((resolve) => job.waiters.push(resolve));
    },
    async shutdown(graceMs = SHUTDOWN_GRACE_MS) {
      if (!stopping) {
        stopping = true;
        // End every progress stream: their pages reload and reconnect when the server is back.
        for (const job of jobs.values()) notify(job);
      }
      const live = [...jobs.values()].filter((j) => !TERMINAL.has(j.view.status));
      const report: ShutdownReport = {
        unfinished: live.map((j) => ({ id: j.view.id, title: j.view.title, status: j.view.status, fraction: j.view.fraction })),
      };
      for (const job of runningIds()) {
        if (job.view.status === 'cancelling') continue; // a cancel under way finishes as a cancel
        job.stopReason = 'shutdown';
        job.abort?.abort(DETACH);
      }
      const done = Promise.all(live.map((j) => j.done).filter(Boolean));
      await Promise.race([done, new Promise((r) => setTimeout(r, graceMs).unref())]);
      // Whatever did not stop in time: its row says queued, so the next start takes it up again.
      for (const job of live) {
        if (!TERMINAL.has(job.view.status) && job.view.status !== 'queued') {
          job.view.status = 'queued';
          persist(job, true);
        }
      }
      if (report.unfinished.length) {
        opts.log?.(
          `stopping with ${report.unfinished.length} evaluation(s) not finished; they stay queued and resume at the next start: ` +
            report.unfinished.map((u) => `${u.id} ("${u.title}", ${u.status}, ${Math.round(100 * u.fraction)} %)`).join('; '),
        );
      } else opts.log?.('stopping: no evaluation was running or waiting');
      return report;
    },
    async close() {
      if (!stopping) await this.shutdown();
      for (const job of jobs.values()) notify(job);
    },
  };
}
