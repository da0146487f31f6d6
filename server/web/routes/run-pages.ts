/**
 * Run pages: progress of a background evaluation (server-sent events for the page script; a plain
 * refresh without JavaScript), cancel, and the hand-over to the result page.
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { TERMINAL, type JobRunner, type JobView } from '../jobs.ts';
import { notFound } from '../plugins/errors.ts';
import { percent } from '../../report/format.ts';
import type { StreamGate } from '../streams.ts';
import type { WebDeps } from '../deps.ts';

/** Jobs are kept in the database; an id it does not know was never accepted here, or finished long ago. */
export const unknownJob = () =>
  Object.assign(notFound('This evaluation'), {
    message: 'This evaluation is not known to the server (it may have finished long ago and been cleared). Finished results are listed under Results.',
  });

type IdParams = { Params: { id: string } };

/** The status in words: what the person waiting needs to know. */
export function statusText(job: JobView): string {
  switch (job.status) {
    case 'queued':
      return job.ahead > 0 ? `Waiting for a free worker (${job.ahead} evaluation${job.ahead === 1 ? '' : 's'} ahead)` : 'Starting';
    case 'running':
      return 'Running';
    case 'cancelling':
      return 'Stopping';
    case 'done':
      return 'Finished';
    case 'cancelled':
      return 'Cancelled';
    case 'failed':
      return 'Stopped with a problem';
  }
}

/** "about 3 min left" from seconds (rounded up to what a person plans with). */
export function timeLeftText(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return '';
  if (seconds < 10) return 'a few seconds left';
  if (seconds < 90) return `about ${Math.ceil(seconds / 10) * 10} s left`;
  if (seconds < 5400) return `about ${Math.ceil(seconds / 60)} min left`;
  return `about ${(seconds / 3600).toFixed(1)} h left`;
}

/** The job as the progress page and its script show it. */
export function jobPayload(job: JobView, serverStopping = false) {
  return {
    id: job.id,
    status: job.status,
    statusText: statusText(job),
    fraction: job.fraction,
    percentText: percent(job.fraction),
    stage: job.stage,
    timeLeftText: job.status === 'running' ? timeLeftText(job.secondsLeft) : '',
    where: job.where,
    trouble: job.trouble,
    resumed: job.resumed > 0,
    resumedText: job.resumed > 0 ? 'Resumed after a restart of the server: the work finished before it was kept.' : '',
    message: serverStopping && !TERMINAL.has(job.status) ? 'The server is stopping; this evaluation is kept and resumes when it starts again.' : job.message,
    problems: job.problems,
    finished: TERMINAL.has(job.status),
    serverStopping: serverStopping && !TERMINAL.has(job.status),
    resultUrl: job.resultId ? `/results/${job.resultId}` : null,
  };
}

/** Async stream of SSE messages for one job: its state now, then at every change until it finishes (or the server stops). */
export async function* jobEvents(jobs: JobRunner, id: string): AsyncGenerator<{ id: string; event: string; data: unknown }> {
  let job = jobs.get(id);
  let n = 0;
  while (job) {
    const end = TERMINAL.has(job.status) || jobs.stopping;
    yield { id: String(n++), event: end ? 'end' : 'progress', data: jobPayload(job, jobs.stopping) };
    if (end) return;
    job = await jobs.nextChange(id);
  }
}

/** Streams a job's events within the stream caps; the slot is freed when the client goes away. */
export async function sendJobEvents(deps: { jobs: JobRunner; streams: StreamGate }, req: FastifyRequest, reply: FastifyReply, id: string) {
  const release = deps.streams.open(id, req.ip);
  reply.raw.once('close', release);
  try {
    await reply.sse.send(jobEvents(deps.jobs, id));
  } finally {
    release();
  }
}

export default async function runPages(app: FastifyInstance, deps: WebDeps) {
  const { jobs } = deps;
  const jobOr404 = (id: string) => {
    const job = jobs.get(id);
    if (!job) throw unknownJob();
    return job;
  };

  app.get<IdParams>('/runs/:id', async (req, reply) => {
    const job = jobOr404(req.params.id);
    if (job.status === 'done' && job.resultId) return reply.redirect(`/results/${job.resultId}`, 303);
    const scenarioLink = job.scenarioRef ? `/scenarios/${encodeURIComponent(job.scenarioRef)}` : '';
    const payload = jobPayload(job, jobs.stopping);
    return reply.page('run', {
      title: `${payload.statusText}: ${job.title}`,
      job: payload,
      jobTitle: job.title,
      scenarioLink,
      editLink: scenarioLink ? `${scenarioLink}/edit` : '',
      eventsUrl: `/runs/${job.id}/events`,
      cancelUrl: `/runs/${job.id}/cancel`,
      refresh: !TERMINAL.has(job.status),
      scripts: ['/assets/run-progress.js'],
    });
  });

  app.get<IdParams>('/runs/:id/events', { sse: 'only' }, async (req, reply) => {
    jobOr404(req.params.id);
    await sendJobEvents(deps, req, reply, req.params.id);
  });

  app.post<IdParams>('/runs/:id/cancel', async (req, reply) => {
    jobOr404(req.params.id);
    jobs.cancel(req.params.id);
    return reply.redirect(`/runs/${req.params.id}`, 303);
  });
}
