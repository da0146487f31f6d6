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
 * after a restart. The in-memory table and the operations every part shares are in job-state.ts; each part
 * of the life cycle here (start, one attempt, stop, resume, submit, cancel, shutdown) is a function of it.
 */
import { randomUUID } from 'node:crypto';
import { LimitError } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { CancelledError, DETACH } from '../jobs/task-runner.ts';
import { runEvaluation } from '../jobs/evaluation-job.ts';
import { parseSafe, stringifySafe } from '../jobs/json-safe.ts';
import { longRunProblem } from './run-cost.ts';
import { TERMINAL, fromRow, guarded, notify, persist, update, viewOf, type Job, type JobRunnerOptions, type JobStatus, type JobTable, type JobView } from './job-state.ts';

export { TERMINAL, type JobRunnerOptions, type JobStatus, type JobView } from './job-state.ts';

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

/** Default time shutdown waits for running tasks to stop [ms]. */
export const SHUTDOWN_GRACE_MS = 3_000;

export function makeJobRunner(opts: JobRunnerOptions): JobRunner {
  const t: JobTable = { opts, jobs: new Map(), waiting: [], running: 0, stopping: false };
  resumeUnfinished(t);
  return {
    get stopping() {
      return t.stopping;
    },
    submit: (input) => submitJob(t, input),
    get(id) {
      const job = t.jobs.get(id);
      if (job) return viewOf(t, job);
      const row = opts.store.jobs.get(id);
      return row ? fromRow(row, opts.runner.where) : undefined;
    },
    cancel: (id) => cancelJob(t, id),
    nextChange(id) {
      const job = t.jobs.get(id);
      if (!job) return Promise.resolve(this.get(id));
      if (TERMINAL.has(job.view.status) || t.stopping) return Promise.resolve(viewOf(t, job));
      return new Promise((resolve) => job.waiters.push(resolve));
    },
    shutdown: (graceMs = SHUTDOWN_GRACE_MS) => shutdownJobs(t, graceMs),
    async close() {
      if (!t.stopping) await this.shutdown();
      for (const job of t.jobs.values()) notify(t, job);
    },
  };
}

/** Starts waiting jobs while there is room. */
function pump(t: JobTable): void {
  while (!t.stopping && t.running < t.opts.concurrency && t.waiting.length) {
    const job = t.waiting.shift()!;
    if (job.view.status !== 'queued') continue;
    t.running++;
    job.done = runAttempt(t, job).finally(() => {
      t.running--;
      pump(t);
    });
    for (const w of t.waiting) notify(t, w);
  }
}

function enqueue(t: JobTable, job: Job): void {
  t.jobs.set(job.view.id, job);
  t.waiting.push(job);
  pump(t);
}

/** One attempt at a job: from its stored checkpoint to a result, a failure, or a stop. */
async function runAttempt(t: JobTable, job: Job): Promise<void> {
  const { store, runner } = t.opts;
  const abort = new AbortController();
  job.abort = abort;
  job.attemptStart = Date.now();
  job.attemptFraction = job.view.fraction;
  update(t, job, { status: 'running', stage: job.view.resumed ? 'taking up again after the restart' : 'starting' });
  // The wall-time limit counts computing, from the first sign of it (a task reporting progress or a
  // result), not the wait for a free thread or queue worker.
  let wall: NodeJS.Timeout | undefined;
  const computing = () => {
    if (wall || abort.signal.aborted) return;
    wall = setTimeout(() => {
      job.stopReason ??= 'timeout';
      abort.abort();
    }, t.opts.wallSeconds * 1000);
    wall.unref();
  };
  const id = job.view.id;
  try {
    const point = store.jobs.point(id);
    const chunks = new Map([...store.jobs.chunks(id)].map(([k, text]) => [k, parseSafe(text)]));
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
        if (job.view.status === 'running') update(t, job, { fraction, stage }, false);
      },
    });
    if (abort.signal.aborted) throw new CancelledError();
    finish(t, job, out);
  } catch (err) {
    if (abort.signal.aborted || err instanceof CancelledError) {
      stopped(t, job);
    } else {
      t.opts.onError?.(err);
      update(t, job, { status: 'failed', stage: 'failed', message: 'The evaluation failed unexpectedly; the details were logged on the server.' });
    }
  } finally {
    if (wall) clearTimeout(wall);
    job.abort = undefined;
    if (TERMINAL.has(job.view.status)) guarded(t, () => store.jobs.clearCheckpoint(id));
  }
}

/** A finished evaluation: its result saved (the job done), or its problems listed (the job failed). */
function finish(t: JobTable, job: Job, out: Awaited<ReturnType<typeof runEvaluation>>): void {
  if (out.kind === 'invalid') {
    update(t, job, { status: 'failed', stage: 'failed', message: 'The scenario cannot be run as it stands.', problems: out.problems });
    return;
  }
  try {
    const saved = t.opts.store.saveResult({ scenarioRef: job.view.scenarioRef, scenario: job.scenario, document: out.document });
    update(t, job, { status: 'done', fraction: 1, stage: 'done', resultId: saved.id, message: 'Finished.' });
  } catch (err) {
    t.opts.onError?.(err);
    update(t, job, { status: 'failed', stage: 'failed', message: 'The result could not be saved; the details were logged on the server.' });
  }
}

/** A job whose tasks were aborted: cancelled, timed out, or interrupted by shutdown (kept for resuming). */
function stopped(t: JobTable, job: Job): void {
  const at = Math.round(100 * job.view.fraction);
  switch (job.stopReason) {
    case 'timeout':
      update(t, job, {
        status: 'failed',
        stage: 'stopped',
        message: `Stopped after ${t.opts.wallSeconds} s, the longest time this server spends on one evaluation (${at} % done).`,
        problems: [longRunProblem(job.scenario, t.opts.wallSeconds)],
      });
      return;
    case 'shutdown':
      // Back to the queue in the database: the next start takes it up again.
      Object.assign(job.view, { status: 'queued', stage: 'waiting for the server to start again' });
      persist(t, job, true);
      notify(t, job);
      return;
    default:
      update(t, job, { status: 'cancelled', stage: 'cancelled', message: `Cancelled at ${at} %; nothing was saved.` });
  }
}

/** Takes up what an earlier run of the server left queued or running. */
function resumeUnfinished(t: JobTable): void {
  for (const r of t.opts.store.jobs.unfinished('evaluation')) {
    const { ahead: _a, secondsLeft: _s, where: _w, trouble: _t, ...rowView } = fromRow(r, t.opts.runner.where);
    const job: Job = { view: rowView, scenario: r.scenario, waiters: [] };
    if (r.status === 'cancelling') {
      t.jobs.set(r.id, job);
      update(t, job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled; the server restarted before it stopped. Nothing was saved.' });
      continue;
    }
    const resumed = r.resumed + 1;
    Object.assign(job.view, { status: 'queued', stage: 'waiting for a free worker', resumed });
    persist(t, job, true);
    t.opts.log?.(`resuming evaluation ${r.id} ("${r.title}", ${Math.round(100 * r.fraction)} % done before the restart)`);
    enqueue(t, job);
  }
}

function submitJob(t: JobTable, { scenario, scenarioRef }: { scenario: Scenario; scenarioRef: string | null }): JobView {
  const { opts } = t;
  if (t.stopping) {
    throw Object.assign(
      new LimitError([{ path: 'evaluations', value: 'server stopping', message: 'this server is stopping; try again when it is back' }]),
      { statusCode: 503 },
    );
  }
  const queued = t.waiting.filter((j) => j.view.status === 'queued').length;
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
  opts.store.jobs.insert({ ...job.view, kind: 'evaluation', scenario, finishedAt: null });
  job.lastSaved = Date.now();
  enqueue(t, job);
  return viewOf(t, job);
}

function cancelJob(t: JobTable, id: string): JobView | undefined {
  const job = t.jobs.get(id);
  if (!job) {
    const row = t.opts.store.jobs.get(id);
    return row ? fromRow(row, t.opts.runner.where) : undefined;
  }
  if (!TERMINAL.has(job.view.status)) {
    if (job.view.status === 'queued') {
      const i = t.waiting.indexOf(job);
      if (i >= 0) t.waiting.splice(i, 1);
      update(t, job, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled before it started; nothing was saved.' });
      guarded(t, () => t.opts.store.jobs.clearCheckpoint(id));
    } else {
      job.stopReason ??= 'cancel';
      update(t, job, { status: 'cancelling', stage: 'stopping' });
      job.abort?.abort();
    }
  }
  return viewOf(t, job);
}

async function shutdownJobs(t: JobTable, graceMs: number): Promise<ShutdownReport> {
  if (!t.stopping) {
    t.stopping = true;
    // End every progress stream: their pages reload and reconnect when the server is back.
    for (const job of t.jobs.values()) notify(t, job);
  }
  const live = [...t.jobs.values()].filter((j) => !TERMINAL.has(j.view.status));
  const report: ShutdownReport = {
    unfinished: live.map((j) => ({ id: j.view.id, title: j.view.title, status: j.view.status, fraction: j.view.fraction })),
  };
  const runningNow = [...t.jobs.values()].filter((j) => j.view.status === 'running' || j.view.status === 'cancelling');
  for (const job of runningNow) {
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
      persist(t, job, true);
    }
  }
  if (report.unfinished.length) {
    t.opts.log?.(
      `stopping with ${report.unfinished.length} evaluation(s) not finished; they stay queued and resume at the next start: ` +
        report.unfinished.map((u) => `${u.id} ("${u.title}", ${u.status}, ${Math.round(100 * u.fraction)} %)`).join('; '),
    );
  } else t.opts.log?.('stopping: no evaluation was running or waiting');
  return report;
}
