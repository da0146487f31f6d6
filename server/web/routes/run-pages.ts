/**
 * Run pages: progress of a background evaluation (server-sent events for the page script; a plain
 * refresh without JavaScript), cancel, and the hand-over to the result page.
 */
import type { FastifyInstance } from 'fastify';
import { TERMINAL, type JobRunner, type JobView } from '../jobs.ts';
import { notFound } from '../plugins/errors.ts';

/** Jobs live in memory: after a restart (or long after they finished) the server no longer knows them. */
export const unknownJob = () =>
  Object.assign(notFound('This evaluation'), {
    message: 'This evaluation is not known to the server (it may have finished long ago, or the server was restarted). Finished results are listed under Results.',
  });
import { percent } from '../../report/format.ts';
import type { WebDeps } from '../deps.ts';

type IdParams = { Params: { id: string } };

const STATUS_WORDS: Record<JobView['status'], string> = {
  queued: 'Waiting for a free worker',
  running: 'Running',
  cancelling: 'Stopping',
  done: 'Finished',
  cancelled: 'Cancelled',
  failed: 'Stopped with a problem',
};

/** The job as the progress page and its script show it. */
export function jobPayload(job: JobView) {
  return {
    id: job.id,
    status: job.status,
    statusText: STATUS_WORDS[job.status],
    fraction: job.fraction,
    percentText: percent(job.fraction),
    stage: job.stage,
    message: job.message,
    problems: job.problems,
    finished: TERMINAL.has(job.status),
    resultUrl: job.resultId ? `/results/${job.resultId}` : null,
  };
}

/** Async stream of SSE messages for one job: its state now, then at every change until it finishes. */
export async function* jobEvents(jobs: JobRunner, id: string): AsyncGenerator<{ id: string; event: string; data: unknown }> {
  let job = jobs.get(id);
  let n = 0;
  while (job) {
    yield { id: String(n++), event: TERMINAL.has(job.status) ? 'end' : 'progress', data: jobPayload(job) };
    if (TERMINAL.has(job.status)) return;
    job = await jobs.nextChange(id);
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
    return reply.page('run', {
      title: `${STATUS_WORDS[job.status]}: ${job.title}`,
      job: jobPayload(job),
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
    await reply.sse.send(jobEvents(jobs, req.params.id));
  });

  app.post<IdParams>('/runs/:id/cancel', async (req, reply) => {
    jobOr404(req.params.id);
    jobs.cancel(req.params.id);
    return reply.redirect(`/runs/${req.params.id}`, 303);
  });
}
