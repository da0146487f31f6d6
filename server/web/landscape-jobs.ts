/**
 * Landscape evaluations in the background, durable in the same job table as transect runs (job-store.ts,
 * kind 'landscape'): the row is written before the server answers, with the scenario and its map files;
 * progress, the stop message and the finished result (maps, downloads, document) are stored in it too, so
 * a result page keeps working after a restart and a job left queued or running is started again.
 *
 * One child process (landscape-child.ts) computes one map at a time; cancel and the wall-time limit end
 * that process at once. The transect runner leaves these rows alone.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { randomUUID } from 'node:crypto';
import { LimitError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { childProcessExecArgv } from '../jobs/worker-loader.ts';
import type { JobStore, StoredJob, StoredJobStatus } from './job-store.ts';
import type { LandscapeDownload, LandscapeTask, LandscapeTaskResult } from './landscape-worker.ts';
import type { LandscapeDocument } from '../analysis/landscape-scenario.ts';

export const LANDSCAPE_JOB_KIND = 'landscape';

/** What a landscape job row keeps in its scenario column: the scenario and its map files (base64). */
export interface LandscapeJobInput {
  scenario: unknown;
  files: Record<string, string>;
  /** Where it came from: a demo reference, or 'upload'. */
  source: string;
  /** A sentence on the page about the model cell used (e.g. coarser than the demo's own). */
  cellNote: string;
}

export interface LandscapeOutput {
  doc: LandscapeDocument;
  maps: { id: string; title: string; hint: string; svg: string }[];
  downloads: { name: string; label: string; type: string; base64: string }[];
}

export interface LandscapeJobView {
  id: string;
  status: StoredJobStatus;
  fraction: number;
  stage: string;
  title: string;
  source: string;
  cellNote: string;
  createdAt: string;
  message: string;
  problems: Problem[];
  resumed: number;
}

export interface LandscapeJobs {
  /** @throws LimitError (503) when too many map evaluations wait, or the server is stopping */
  submit(title: string, input: LandscapeJobInput): LandscapeJobView;
  get(id: string): LandscapeJobView | undefined;
  cancel(id: string): LandscapeJobView | undefined;
  /** The stored result of a finished job. */
  output(id: string): LandscapeOutput | undefined;
  /** One download of a finished job, by file name. */
  download(id: string, name: string): { name: string; type: string; bytes: Buffer } | undefined;
  /** Resolves when the job ends (tests). */
  settled(id: string): Promise<LandscapeJobView | undefined>;
  close(): Promise<void>;
}

export interface LandscapeJobOptions {
  jobs: JobStore;
  wallSeconds: number;
  maxQueued: number;
  onError?: (err: unknown) => void;
  log?: (message: string) => void;
}

interface Live {
  row: StoredJob;
  input: LandscapeJobInput;
  abort?: AbortController;
  stop?: 'cancel' | 'timeout' | 'shutdown';
  lastSaved: number;
  done?: Promise<void>;
  waiters: ((v: LandscapeJobView | undefined) => void)[];
}

const TERMINAL = new Set<StoredJobStatus>(['done', 'cancelled', 'failed']);
const SAVE_INTERVAL_MS = 1_000;

/** Everything the parts below read and change: one object, so each part is a plain function of it. */
interface Table {
  opts: LandscapeJobOptions;
  store: JobStore;
  /** Child processes alive now (killed at close). */
  children: Set<ChildProcess>;
  stopping: boolean;
  live: Map<string, Live>;
  waiting: Live[];
  /** The one job computing now. */
  running: Live | null;
  /** Recently read finished results by job id. */
  outputs: Map<string, LandscapeOutput>;
}

export function makeLandscapeJobs(opts: LandscapeJobOptions): LandscapeJobs {
  const t: Table = { opts, store: opts.jobs, children: new Set(), stopping: false, live: new Map(), waiting: [], running: null, outputs: new Map() };
  resumeUnfinished(t);
  return {
    submit: (title, input) => submitJob(t, title, input),
    get(id) {
      const r = rowOf(t, id);
      return r ? viewOf(r) : undefined;
    },
    cancel(id) {
      cancelJob(t, id);
      return this.get(id);
    },
    output: (id) => outputOf(t, id),
    download(id, name) {
      const d = this.output(id)?.downloads.find((x) => x.name === name);
      return d ? { name: d.name, type: d.type, bytes: Buffer.from(d.base64, 'base64') } : undefined;
    },
    settled(id) {
      const j = t.live.get(id);
      if (!j) return Promise.resolve(this.get(id));
      return new Promise((resolve) => j.waiters.push(resolve));
    },
    async close() {
      t.stopping = true;
      if (t.running) {
        t.running.stop ??= 'shutdown';
        t.running.abort?.abort();
        await t.running.done;
      }
      for (const c of t.children) c.kill('SIGKILL');
    },
  };
}

/** Runs one task in a fresh child process; the signal kills it. */
function runChild(children: Set<ChildProcess>, task: Omit<LandscapeTask, 'report'>, signal: AbortSignal, onProgress: (f: number, m: string) => void) {
  return new Promise<LandscapeTaskResult>((resolve, reject) => {
    const child = fork(fileURLToPath(new URL('./landscape-child.ts', import.meta.url)), [], { execArgv: childProcessExecArgv(), serialization: 'advanced', stdio: ['ignore', 'ignore', 'pipe', 'ipc'] });
    children.add(child);
    let stderr = '';
    child.stderr?.on('data', (b: Buffer) => (stderr = (stderr + b.toString()).slice(-2000)));
    let result: LandscapeTaskResult | undefined;
    const kill = () => child.kill('SIGKILL');
    signal.addEventListener('abort', kill, { once: true });
    child.on('message', (m: { type: string; fraction?: number; message?: string; result?: LandscapeTaskResult }) => {
      if (m.type === 'progress') onProgress(m.fraction ?? 0, m.message ?? '');
      else if (m.type === 'result') result = m.result;
    });
    child.on('error', (e) => reject(e));
    child.on('exit', (code, sig) => {
      children.delete(child);
      signal.removeEventListener('abort', kill);
      if (result) resolve(result);
      else reject(new Error(`the map worker ended (${sig ?? `exit code ${code}`}) without a result${stderr ? `: ${stderr.trim().split('\n').slice(-3).join(' ')}` : ''}`));
    });
    child.send(task);
  });
}

const inputOf = (r: StoredJob) => r.scenario as unknown as LandscapeJobInput;

function viewOf(r: StoredJob): LandscapeJobView {
  const inp = inputOf(r);
  return {
    id: r.id,
    status: r.status,
    fraction: r.fraction,
    stage: r.stage,
    title: r.title,
    source: inp?.source ?? '',
    cellNote: inp?.cellNote ?? '',
    createdAt: r.createdAt,
    message: r.message,
    problems: r.problems,
    resumed: r.resumed,
  };
}

/** Changes a job's row: written (progress at most every SAVE_INTERVAL_MS), waiters woken when it ends. */
function update(t: Table, j: Live, patch: Partial<StoredJob>, force = true): void {
  Object.assign(j.row, patch);
  const now = Date.now();
  if (!force && !TERMINAL.has(j.row.status) && now - j.lastSaved < SAVE_INTERVAL_MS) return;
  j.lastSaved = now;
  try {
    const { status, fraction, stage, message, problems, resumed } = j.row;
    t.store.update(j.row.id, { status, fraction, stage, message, problems, resumed, finishedAt: TERMINAL.has(status) ? new Date().toISOString() : null });
  } catch (err) {
    t.opts.onError?.(err);
  }
  if (TERMINAL.has(j.row.status)) {
    const ws = j.waiters;
    j.waiters = [];
    for (const w of ws) w(viewOf(j.row));
  }
}

/** Starts the next waiting job when none is running. */
function pump(t: Table): void {
  if (t.stopping || t.running) return;
  const j = t.waiting.shift();
  if (!j) return;
  t.running = j;
  j.done = run(t, j).finally(() => {
    t.running = null;
    pump(t);
  });
}

async function run(t: Table, j: Live): Promise<void> {
  const { opts, store } = t;
  const abort = new AbortController();
  j.abort = abort;
  update(t, j, { status: 'running', stage: j.row.resumed ? 'starting again after the restart' : 'starting the map worker', fraction: 0 });
  const wall = setTimeout(() => {
    j.stop ??= 'timeout';
    abort.abort();
  }, opts.wallSeconds * 1000);
  wall.unref();
  const files = Object.fromEntries(Object.entries(j.input.files).map(([k, v]) => [k, new Uint8Array(Buffer.from(v, 'base64'))]));
  try {
    const r = await runChild(t.children, { scenario: j.input.scenario, files }, abort.signal, (fraction, stage) => {
      if (j.row.status === 'running') update(t, j, { fraction, stage }, false);
    });
    if (r.ok) {
      const out: LandscapeOutput = { doc: r.doc, maps: r.maps, downloads: r.downloads.map((d: LandscapeDownload) => ({ name: d.name, label: d.label, type: d.type, base64: Buffer.from(d.bytes).toString('base64') })) };
      store.savePoint(j.row.id, JSON.stringify(out));
      t.outputs.set(j.row.id, out);
      update(t, j, { status: 'done', fraction: 1, stage: 'done', message: 'Finished.' });
    } else {
      update(t, j, { status: 'failed', stage: 'failed', message: r.message, problems: r.problems as Problem[] });
    }
  } catch (err) {
    if (abort.signal.aborted) {
      const at = Math.round(100 * j.row.fraction);
      if (j.stop === 'timeout') update(t, j, { status: 'failed', stage: 'stopped', message: `Stopped after ${opts.wallSeconds} s, the longest this server spends on one map (${at} % done). Try a coarser model cell or fewer options.` });
      else if (j.stop === 'shutdown') update(t, j, { status: 'queued', stage: 'waiting for the server to start again' });
      else update(t, j, { status: 'cancelled', stage: 'cancelled', message: `Cancelled at ${at} %; nothing was saved.` });
    } else {
      opts.onError?.(err);
      update(t, j, { status: 'failed', stage: 'failed', message: 'The map evaluation failed unexpectedly; the details were logged on the server.' });
    }
  } finally {
    clearTimeout(wall);
    j.abort = undefined;
    if (TERMINAL.has(j.row.status)) t.live.delete(j.row.id);
  }
}

function enqueue(t: Table, row: StoredJob): void {
  const j: Live = { row, input: inputOf(row), lastSaved: Date.now(), waiters: [] };
  t.live.set(row.id, j);
  t.waiting.push(j);
  pump(t);
}

/**
 * Takes up the map evaluations an earlier run of the server left queued or running (from the start: a map
 * run is short, and its pieces are not checkpointed).
 */
function resumeUnfinished(t: Table): void {
  for (const r of t.store.unfinished(LANDSCAPE_JOB_KIND)) {
    if (r.status === 'cancelling') {
      t.store.update(r.id, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled; the server restarted before it stopped.', finishedAt: new Date().toISOString() });
      continue;
    }
    r.resumed += 1;
    r.status = 'queued';
    r.stage = 'waiting for the map worker';
    t.store.update(r.id, { status: r.status, stage: r.stage, resumed: r.resumed });
    t.opts.log?.(`resuming map evaluation ${r.id} ("${r.title}")`);
    enqueue(t, r);
  }
}

function rowOf(t: Table, id: string): StoredJob | undefined {
  const j = t.live.get(id);
  if (j) return j.row;
  const r = t.store.get(id);
  return r && r.kind === LANDSCAPE_JOB_KIND ? r : undefined;
}

function submitJob(t: Table, title: string, input: LandscapeJobInput): LandscapeJobView {
  const { opts } = t;
  if (t.stopping) throw Object.assign(new LimitError([{ path: 'evaluations', value: 'server stopping', message: 'this server is stopping; try again when it is back' }]), { statusCode: 503 });
  if (t.waiting.length >= opts.maxQueued) {
    throw Object.assign(
      new LimitError([{ path: 'evaluations', value: `${t.waiting.length} waiting`, message: `this server queues at most ${opts.maxQueued} map evaluations; try again in a few minutes` }]),
      { statusCode: 503 },
    );
  }
  const row: StoredJob = {
    id: randomUUID(),
    kind: LANDSCAPE_JOB_KIND,
    status: 'queued',
    title,
    scenarioRef: input.source,
    scenario: input as unknown as Scenario,
    createdAt: new Date().toISOString(),
    finishedAt: null,
    fraction: 0,
    stage: 'waiting for the map worker',
    message: '',
    problems: [],
    resultId: null,
    resumed: 0,
  };
  t.store.insert(row); // durable before the answer
  enqueue(t, row);
  return viewOf(row);
}

function cancelJob(t: Table, id: string): void {
  const j = t.live.get(id);
  if (!j || TERMINAL.has(j.row.status)) return;
  if (j.row.status === 'queued') {
    const i = t.waiting.indexOf(j);
    if (i >= 0) t.waiting.splice(i, 1);
    update(t, j, { status: 'cancelled', stage: 'cancelled', message: 'Cancelled before it started; nothing was saved.' });
    t.live.delete(id);
  } else {
    j.stop ??= 'cancel';
    update(t, j, { status: 'cancelling', stage: 'stopping' });
    j.abort?.abort();
  }
}

/** The stored result of a finished job (the latest few kept in memory). */
function outputOf(t: Table, id: string): LandscapeOutput | undefined {
  const hit = t.outputs.get(id);
  if (hit) return hit;
  const r = rowOf(t, id);
  if (!r || r.status !== 'done') return undefined;
  const text = t.store.point(id);
  if (!text) return undefined;
  const out = JSON.parse(text) as LandscapeOutput;
  t.outputs.set(id, out);
  while (t.outputs.size > 10) t.outputs.delete(t.outputs.keys().next().value as string);
  return out;
}
