/**
 * The web runner's in-memory job table (jobs.ts) and the small operations on it that every part of the job
 * life cycle shares: the view a page or stream shows, writing a job's state to the database, waking the
 * streams that wait for a change, and forgetting old finished jobs.
 */
import type { Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import type { TaskRunner } from '../jobs/task-runner.ts';
import type { StoredJob } from './job-store.ts';
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

export interface Job {
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

/** Everything the runner's parts read and change: one object, so each part is a plain function of it. */
export interface JobTable {
  opts: JobRunnerOptions;
  /** Jobs in memory by id: every live one, and the latest finished ones. */
  jobs: Map<string, Job>;
  /** Queued jobs in the order they start. */
  waiting: Job[];
  /** Jobs computing now. */
  running: number;
  stopping: boolean;
}

/** Finished jobs kept in memory (older ones are read from the database). */
const KEEP_IN_MEMORY = 100;
/** Finished jobs kept in the database for their pages. */
const KEEP_IN_DATABASE = 500;
/** Shortest interval between two progress writes of one job to the database [ms]. */
const SAVE_INTERVAL_MS = 2_000;

/** Reports an unexpected error from `f` instead of throwing it (database writes that must not stop a job). */
export function guarded(t: JobTable, f: () => void): void {
  try {
    f();
  } catch (err) {
    t.opts.onError?.(err);
  }
}

/** A live job as pages and streams see it, with its place in the queue and the time left. */
export function viewOf(t: JobTable, job: Job): JobView {
  const { runner } = t.opts;
  const ahead = job.view.status === 'queued' ? Math.max(0, t.waiting.indexOf(job)) + (t.running >= t.opts.concurrency ? t.running : 0) : 0;
  let secondsLeft: number | null = null;
  if (job.view.status === 'running' && job.attemptStart !== undefined) {
    const elapsed = (Date.now() - job.attemptStart) / 1000;
    const gained = job.view.fraction - (job.attemptFraction ?? 0);
    if (elapsed >= 1 && gained >= 0.01) secondsLeft = Math.max(0, (elapsed * (1 - job.view.fraction)) / gained);
  }
  const health = runner.health?.();
  return { ...job.view, problems: [...job.view.problems], ahead, secondsLeft, where: runner.where, trouble: health && !health.ok ? health.message : null };
}

/** A job known only from its database row (finished long ago, or before a restart). */
export function fromRow(r: StoredJob, where: string): JobView {
  return {
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
    where,
    trouble: null,
  };
}

/** Wakes every stream waiting for this job's next change. */
export function notify(t: JobTable, job: Job): void {
  const ws = job.waiters;
  job.waiters = [];
  const v = viewOf(t, job);
  for (const w of ws) w(v);
}

/** Writes the job's state to the database (progress at most every SAVE_INTERVAL_MS unless forced). */
export function persist(t: JobTable, job: Job, force: boolean): void {
  const now = Date.now();
  if (!force && job.lastSaved !== undefined && now - job.lastSaved < SAVE_INTERVAL_MS) return;
  job.lastSaved = now;
  const v = job.view;
  guarded(t, () =>
    t.opts.store.jobs.update(v.id, {
      status: v.status,
      fraction: v.fraction,
      stage: v.stage,
      message: v.message,
      problems: v.problems,
      resultId: v.resultId,
      resumed: v.resumed,
      finishedAt: TERMINAL.has(v.status) ? new Date().toISOString() : null,
    }),
  );
}

/** Changes a job's state: written (always when it finishes), old finished jobs pruned, streams woken. */
export function update(t: JobTable, job: Job, patch: Partial<Job['view']>, force = true): void {
  Object.assign(job.view, patch);
  persist(t, job, force || TERMINAL.has(job.view.status));
  if (TERMINAL.has(job.view.status)) prune(t);
  notify(t, job);
}

function prune(t: JobTable): void {
  const finished = [...t.jobs.values()].filter((j) => TERMINAL.has(j.view.status));
  for (const j of finished.slice(0, Math.max(0, finished.length - KEEP_IN_MEMORY))) t.jobs.delete(j.view.id);
  guarded(t, () => t.opts.store.jobs.prune(KEEP_IN_DATABASE));
}
