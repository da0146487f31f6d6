/**
 * PDF briefings for stored results, rendered in a worker thread (server/web/briefing-worker.ts) so the
 * server keeps answering while a briefing is drawn. One thread: briefings are short and rare.
 *
 * Briefings are durable jobs like evaluations (makeBriefingJobs): a request is a row in the database (kind
 * 'briefing', linked to its result) before it is answered or drawn; the PDF is stored with the row when
 * drawn; a briefing left queued or drawing by a stopped or killed server is drawn at the next start; a
 * second request for the same result reuses the job under way or the PDF already drawn.
 */
import { Piscina } from 'piscina';
import type { ResultDocument } from '../analysis/result.ts';
import type { Scenario } from '../model/scenario.ts';
import type { BriefingTask } from './briefing-worker.ts';
import { workerExecArgv } from '../jobs/worker-loader.ts';
import { InputError } from '../model/errors.ts';
import { briefingTextProblems } from '../report/pdf/fonts.ts';
import { randomUUID } from 'node:crypto';
import { notFound } from './plugins/errors.ts';
import type { Store, StoredResult } from './store.ts';
import type { StoredJobStatus } from './job-store.ts';

/** Longest a briefing may take before the request is answered with an error [ms]. */
const BRIEFING_TIMEOUT_MS = 60_000;

export interface BriefingRenderer {
  render(document: ResultDocument, scenario: Scenario): Promise<Buffer>;
  close(): Promise<void>;
}

export function makeBriefingRenderer(): BriefingRenderer {
  const pool = new Piscina<BriefingTask, Uint8Array>({
    filename: new URL('./briefing-worker.ts', import.meta.url).href,
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 60_000,
    execArgv: workerExecArgv(),
  });
  return {
    async render(document, scenario) {
      // Text the briefing's fonts cannot draw is refused by field, before any drawing (report/pdf/fonts.ts).
      const unsupported = briefingTextProblems(scenario);
      if (unsupported.length) throw Object.assign(new InputError('TEXT_NOT_DRAWABLE', unsupported), { statusCode: 422 });
      const bytes = await pool.run({ document, scenario, creationDate: new Date().toISOString() }, { signal: AbortSignal.timeout(BRIEFING_TIMEOUT_MS) });
      return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    },
    close: () => pool.destroy(),
  };
}

export interface BriefingJobView {
  id: string;
  /** queued → running → done | failed. */
  status: StoredJobStatus;
  /** The stored result the briefing draws. */
  resultId: string;
  title: string;
  createdAt: string;
  /** Why it failed, in plain words (status 'failed'). */
  message: string;
  /** Drawn again after a server restart (how many times). */
  resumed: number;
}

export interface BriefingJobs {
  /**
   * A briefing of a stored result: the job under way or already drawn for it, else a new job, written to the
   * database before this returns. Undefined when the result does not exist.
   * @throws InputError TEXT_NOT_DRAWABLE (422) when the scenario holds text the briefing fonts cannot draw
   */
  request(resultId: string): BriefingJobView | undefined;
  get(id: string): BriefingJobView | undefined;
  /** The PDF of a finished briefing job. */
  pdf(id: string): Buffer | undefined;
  /** Resolves once the job has finished (done or failed) or after `ms`, with its state then. */
  wait(id: string, ms: number): Promise<BriefingJobView | undefined>;
  /** Stops drawing: unfinished briefings stay queued in the database and are drawn at the next start. */
  close(): Promise<void>;
}

export interface BriefingJobOptions {
  store: Store;
  renderer?: BriefingRenderer;
  onError?: (err: unknown) => void;
  log?: (message: string) => void;
}

/** What the parts below share: the store, the renderer, who waits for which job, and whether shutdown began. */
interface Drawing {
  opts: BriefingJobOptions;
  store: Store;
  renderer: BriefingRenderer;
  waiters: Map<string, (() => void)[]>;
  closing: boolean;
}

export function makeBriefingJobs(opts: BriefingJobOptions): BriefingJobs {
  const { store } = opts;
  const t: Drawing = { opts, store, renderer: opts.renderer ?? makeBriefingRenderer(), waiters: new Map(), closing: false };
  const view = (id: string) => briefingView(store, id);

  // Briefings a stopped or killed server left unfinished: drawn again now.
  for (const r of store.jobs.unfinished('briefing')) {
    store.jobs.update(r.id, { status: 'queued', stage: 'waiting to be drawn again after the restart', resumed: r.resumed + 1 });
    opts.log?.(`resuming briefing ${r.id} ("${r.title}")`);
    void draw(t, r.id);
  }

  return {
    request(resultId) {
      const result = store.getResult(resultId);
      if (!result) return undefined;
      const known = store.jobs.briefings.latestFor(resultId);
      if (known) return view(known.jobId);
      // Text the briefing's fonts cannot draw is refused by field, before any job (report/pdf/fonts.ts).
      const unsupported = briefingTextProblems(result.scenario);
      if (unsupported.length) throw Object.assign(new InputError('TEXT_NOT_DRAWABLE', unsupported), { statusCode: 422 });
      const id = insertBriefingJob(store, resultId, result);
      void draw(t, id);
      return view(id);
    },
    get: view,
    pdf: (id) => (view(id)?.status === 'done' ? store.jobs.briefings.pdf(id) : undefined),
    wait(id, ms) {
      const v = view(id);
      if (!v || v.status === 'done' || v.status === 'failed') return Promise.resolve(v);
      return new Promise((resolve) => {
        const timer = setTimeout(() => resolve(view(id)), ms);
        timer.unref();
        t.waiters.set(id, [...(t.waiters.get(id) ?? []), () => (clearTimeout(timer), resolve(view(id)))]);
      });
    },
    async close() {
      t.closing = true;
      for (const id of [...t.waiters.keys()]) finished(t, id);
      await t.renderer.close();
    },
  };
}

function briefingView(store: Store, id: string): BriefingJobView | undefined {
  const row = store.jobs.get(id);
  const resultId = row && store.jobs.briefings.resultOf(id);
  if (!row || row.kind !== 'briefing' || !resultId) return undefined;
  return { id, status: row.status, resultId, title: row.title, createdAt: row.createdAt, message: row.message, resumed: row.resumed };
}

/** Durable before anything is answered or drawn: the job row, then its link to the result. Returns the job id. */
function insertBriefingJob(store: Store, resultId: string, result: StoredResult): string {
  const id = randomUUID();
  const now = new Date().toISOString();
  store.jobs.insert({
    id,
    kind: 'briefing',
    status: 'queued',
    title: result.title,
    scenarioRef: result.scenarioRef,
    scenario: result.scenario,
    createdAt: now,
    finishedAt: null,
    fraction: 0,
    stage: 'waiting to be drawn',
    message: '',
    problems: [],
    resultId: null,
    resumed: 0,
  });
  store.jobs.briefings.insert(id, resultId);
  return id;
}

function finished(t: Drawing, id: string): void {
  for (const w of t.waiters.get(id) ?? []) w();
  t.waiters.delete(id);
}

/** Draws one briefing job and stores its PDF (or why it failed); wakes its waiters either way. */
async function draw(t: Drawing, id: string): Promise<void> {
  const { store } = t;
  const resultId = store.jobs.briefings.resultOf(id);
  const result = resultId ? store.getResult(resultId) : undefined;
  try {
    if (!result) {
      store.jobs.update(id, { status: 'failed', stage: 'failed', message: 'The result was deleted before its briefing was drawn.', finishedAt: new Date().toISOString() });
      return;
    }
    store.jobs.update(id, { status: 'running', stage: 'drawing the briefing' });
    const pdf = await t.renderer.render(result.document, result.scenario);
    if (t.closing) return;
    store.jobs.briefings.savePdf(id, pdf);
    store.jobs.update(id, { status: 'done', fraction: 1, stage: 'done', message: 'Finished.', finishedAt: new Date().toISOString() });
  } catch (err) {
    // Stopped by the shutdown: the row stays unfinished and is drawn at the next start.
    if (t.closing) return;
    const problems = err instanceof InputError ? err.problems : [];
    if (!problems.length) t.opts.onError?.(err);
    store.jobs.update(id, {
      status: 'failed',
      stage: 'failed',
      message: problems.length ? problems.map((p) => `${p.path}: ${p.message}`).join('; ') : 'The briefing could not be drawn; the details were logged on the server.',
      problems,
      finishedAt: new Date().toISOString(),
    });
  } finally {
    finished(t, id);
  }
}

/** Longest a page's briefing link waits for the drawing before answering that it is still under way [ms]. */
const BRIEFING_WAIT_MS = 90_000;

/**
 * The PDF of a result's briefing for a download link: the durable job for it (reused or new), awaited.
 * @throws notFound for an unknown result; InputError 422 for text the fonts cannot draw; 503 when the
 *   drawing failed or did not finish in time (the job goes on: asking again later gets its PDF)
 */
export async function briefingNow(briefings: BriefingJobs, resultId: string, waitMs = BRIEFING_WAIT_MS): Promise<Buffer> {
  const job = briefings.request(resultId);
  if (!job) throw notFound('This result');
  const v = await briefings.wait(job.id, waitMs);
  const pdf = v && briefings.pdf(v.id);
  if (pdf) return pdf;
  const message = v?.status === 'failed' ? `the briefing could not be drawn: ${v.message}` : 'the briefing is still being drawn (the server may be stopping or busy); ask again in a minute';
  throw Object.assign(new InputError('BRIEFING_NOT_READY', [{ path: 'briefing', value: job.id, message }]), { statusCode: 503 });
}
