/**
 * The distributed runner: tasks become BullMQ jobs in Redis and are taken by `npm run worker` processes on
 * any machine with the code and the same REDIS_URL.
 *
 * - Job ids are the task keys (tool version + scenario fingerprint + piece), so a piece resubmitted after a
 *   retry or a server restart is computed once; the tool version travels in the job and a worker of another
 *   version refuses it with a message naming both.
 * - Results, failures and progress come through one QueueEvents stream (no listener per job); a reconcile
 *   pass every few seconds (and whenever the connection comes back) reads the state of every outstanding
 *   job, so an event missed while Redis was away is never waited for in vain, and a job that an emptied
 *   Redis lost is added again: accepted work is never lost.
 * - Cancel removes waiting jobs and tells workers (pub/sub) to stop running ones.
 * - A worker killed mid-task loses its lock; another worker's stalled-job check puts the task back.
 */
import { randomUUID } from 'node:crypto';
import { Queue, QueueEvents, type JobsOptions } from 'bullmq';
import type { Redis } from 'ioredis';
import { TOOL } from '../version.ts';
import { fromJsonSafe, toJsonSafe } from './json-safe.ts';
import { CANCELLED_REASON, cancelChannel, jobIdOf, queueName, redactedUrl, redisConnection } from './queue-config.ts';
import { CancelledError, DETACH, type MapOptions, type RunnerHealth, type TaskKind, type TaskRunner } from './task-runner.ts';

/** What a queue job carries. */
export interface QueueJobData {
  kind: string;
  /** JSON-safe payload (json-safe.ts). */
  payload: unknown;
  /** Version of the tool that made the job; workers of another version refuse it. */
  toolVersion: string;
}

export interface QueueRunnerOptions {
  /** redis://[user:password@]host:port[/db] */
  url: string;
  /** Evaluations the web server lets run at once (their tasks spread over the workers). Default 4. */
  concurrency?: number;
  /** Interval of the reconcile pass [ms] (default 3 s). */
  reconcileMs?: number;
  log?: (message: string) => void;
}

interface Waiter {
  resolve: (r: unknown) => void;
  reject: (e: unknown) => void;
  onProgress?: (fraction: number, stage: string) => void;
  data: QueueJobData;
}

const JOB_OPTIONS: JobsOptions = {
  // Failures of a computation are deterministic: no retries (stalled workers are handled separately).
  attempts: 1,
  // Kept a while so a restarted server can still collect results it had not stored yet.
  removeOnComplete: { age: 3_600 },
  removeOnFail: { age: 3_600 },
};

export interface QueueRunner extends TaskRunner {
  /** Queue workers seen at the last check. */
  workers(): number;
}

/** What the parts below share: the connections, the queue, who waits for which job, and the health seen. */
interface QueueState {
  opts: QueueRunnerOptions;
  name: string;
  shownUrl: string;
  conn: Redis;
  eventsConn: Redis;
  pub: Redis;
  queue: Queue<QueueJobData>;
  events: QueueEvents;
  /** Batches waiting for each job id (an identical piece of two batches shares the id). */
  waiters: Map<string, Waiter[]>;
  healthy: boolean;
  problem: string;
  workerCount: number;
  closed: boolean;
  reconciling: boolean;
}

export async function makeQueueRunner(opts: QueueRunnerOptions): Promise<QueueRunner> {
  const name = queueName();
  const conn = redisConnection(opts.url, 'barrier-web-queue');
  const eventsConn = redisConnection(opts.url, 'barrier-web-events');
  const st: QueueState = {
    opts,
    name,
    shownUrl: redactedUrl(opts.url),
    conn,
    eventsConn,
    pub: redisConnection(opts.url, 'barrier-web-cancel'),
    queue: new Queue<QueueJobData>(name, { connection: conn }),
    events: new QueueEvents(name, { connection: eventsConn }),
    waiters: new Map(),
    healthy: true,
    problem: '',
    workerCount: 0,
    closed: false,
    reconciling: false,
  };
  watchConnections(st);
  listenToEvents(st);
  const timer = setInterval(() => void reconcile(st), opts.reconcileMs ?? 3_000);
  timer.unref();
  await st.events.waitUntilReady().catch(() => {});
  void reconcile(st);

  const workersText = () => `${st.workerCount} queue worker${st.workerCount === 1 ? '' : 's'}`;
  return {
    get where() {
      return `${workersText()} (Redis at ${st.shownUrl})`;
    },
    concurrency: Math.max(1, opts.concurrency ?? 4),
    workers: () => st.workerCount,
    // Each queue worker runs THREADS tasks at once; the web server sees processes, not their threads.
    capacity: () => ({ tasks: Math.max(1, st.workerCount), text: workersText() }),
    health(): RunnerHealth {
      if (!st.healthy) return { ok: false, message: `Queue unavailable, retrying (${st.problem}). Accepted work is kept.` };
      if (st.workerCount === 0) return { ok: false, message: 'No queue worker is connected: the work waits in the queue until one starts (npm run worker).' };
      return { ok: true, message: `${st.workerCount} queue workers` };
    },
    map: <P, R>(kind: TaskKind, payloads: readonly P[], o: MapOptions<R> = {}) => mapOnQueue(st, kind, payloads, o),
    async close() {
      st.closed = true;
      clearInterval(timer);
      for (const id of [...st.waiters.keys()]) settle(st, id, (w) => w.reject(new CancelledError('the web server is stopping')));
      // Closing waits for Redis; when it is away, give up after a moment and drop the connections.
      await Promise.race([Promise.allSettled([st.events.close(), st.queue.close()]), new Promise((r) => setTimeout(r, 2_000).unref())]);
      for (const c of [st.conn, st.eventsConn, st.pub]) c.disconnect();
    },
  };
}

/** Health from the connections' events; a connection back after trouble triggers a reconcile pass. */
function watchConnections(st: QueueState): void {
  const { opts, shownUrl, conn, eventsConn } = st;
  const setTrouble = (what: string) => {
    if (st.healthy) opts.log?.(`queue unavailable (${what}), retrying`);
    st.healthy = false;
    st.problem = what;
  };
  for (const c of [conn, eventsConn, st.pub]) {
    c.on('error', (e: Error) => setTrouble(`Redis at ${shownUrl}: ${e.message}`));
    c.on('close', () => !st.closed && setTrouble(`Redis at ${shownUrl} closed the connection`));
    c.on('ready', () => {
      if (!st.healthy && conn.status === 'ready' && eventsConn.status === 'ready') {
        st.healthy = true;
        opts.log?.(`queue at ${shownUrl} reachable again`);
        void reconcile(st);
      }
    });
  }
  // Errors are reported through health(); the emitters must have a listener so they never throw.
  st.queue.on('error', () => {});
  st.events.on('error', () => {});
}

/** Results, failures and progress of every job, through the one QueueEvents stream. */
function listenToEvents(st: QueueState): void {
  st.events.on('completed', ({ jobId, returnvalue }) => settle(st, jobId, (w) => w.resolve(parseReturn(returnvalue))));
  st.events.on('failed', ({ jobId, failedReason }) => failed(st, jobId, failedReason));
  st.events.on('progress', ({ jobId, data }) => {
    const d = data as { fraction?: number; stage?: string };
    if (typeof d?.fraction === 'number') for (const w of st.waiters.get(jobId) ?? []) w.onProgress?.(d.fraction, d.stage ?? '');
  });
}

function settle(st: QueueState, id: string, f: (w: Waiter) => void): void {
  const ws = st.waiters.get(id);
  if (!ws) return;
  st.waiters.delete(id);
  for (const w of ws) f(w);
}

const parseReturn = (v: unknown) => fromJsonSafe(typeof v === 'string' ? JSON.parse(v) : v);

/**
 * A task stopped by a cancel while batches here still wait for it (an identical scenario submitted twice,
 * or another web server sharing the queue): it is added again for them instead of failing them.
 */
function failed(st: QueueState, id: string, reason: string): void {
  const ws = st.waiters.get(id);
  if (ws?.length && reason === CANCELLED_REASON) {
    st.opts.log?.(`task ${id} was cancelled for another batch; adding it again for the ${ws.length} still waiting`);
    void add(st, [id], [ws[0].data]).catch(() => {});
    return;
  }
  settle(st, id, (w) => w.reject(new Error(reason)));
}

async function add(st: QueueState, ids: string[], datas: QueueJobData[]): Promise<void> {
  const { queue } = st;
  const states = await Promise.all(ids.map((id) => queue.getJobState(id)));
  const fresh: number[] = [];
  await Promise.all(
    ids.map(async (id, i) => {
      if (states[i] === 'completed') {
        // The same piece finished for another batch (identical scenario) and is still held: take its result.
        const job = await queue.getJob(id);
        if (job?.finishedOn) return settle(st, id, (w) => w.resolve(parseReturn(job.returnvalue)));
      }
      // A job of the same id left failed (an earlier cancel or refusal) would block the add: remove it first.
      if (states[i] === 'failed') await queue.remove(id).catch(() => 0);
      fresh.push(i);
    }),
  );
  if (fresh.length) await queue.addBulk(fresh.map((i) => ({ name: datas[i].kind, data: datas[i], opts: { ...JOB_OPTIONS, jobId: ids[i] } })));
}

/** Reads the state of every outstanding job: collects missed results, re-adds jobs Redis lost. */
async function reconcile(st: QueueState): Promise<void> {
  if (st.reconciling || st.closed) return;
  const { queue, waiters } = st;
  st.reconciling = true;
  try {
    st.workerCount = await queue.getWorkersCount();
    const ids = [...waiters.keys()];
    const lost: string[] = [];
    // States read 200 at a time (ioredis pipelines the commands): one round trip per batch, not per job.
    const states: string[] = [];
    for (let i = 0; i < ids.length; i += 200) states.push(...(await Promise.all(ids.slice(i, i + 200).map((id) => queue.getJobState(id)))));
    for (const [n, id] of ids.entries()) {
      const state = states[n];
      if (!waiters.has(id)) continue;
      if (state === 'completed' || state === 'failed') {
        const job = await queue.getJob(id);
        if (!job) continue;
        if (state === 'completed') settle(st, id, (w) => w.resolve(parseReturn(job.returnvalue)));
        else failed(st, id, job.failedReason);
      } else if (state === 'unknown') lost.push(id);
    }
    if (lost.length) {
      const datas = lost.map((id) => waiters.get(id)?.[0]?.data).filter((d): d is QueueJobData => d !== undefined);
      if (datas.length === lost.length) {
        st.opts.log?.(`re-adding ${lost.length} task(s) the queue no longer held (Redis restarted empty?)`);
        await add(st, lost, datas);
      }
    }
  } catch {
    // Unreachable: health() says so; the next pass tries again.
  } finally {
    st.reconciling = false;
  }
}

/** One batch on the queue: its tasks added (or joined), their results in order, cancel and detach handled. */
async function mapOnQueue<P, R>(st: QueueState, kind: TaskKind, payloads: readonly P[], o: MapOptions<R>): Promise<R[]> {
  if (o.signal?.aborted) throw new CancelledError();
  const base = o.key ?? randomUUID();
  const ids = payloads.map((_, i) => jobIdOf(o.taskKeys?.[i] ?? `${base}:${i}`));
  const datas: QueueJobData[] = payloads.map((p) => ({ kind, payload: toJsonSafe(p), toolVersion: TOOL.version }));
  const own: Waiter[] = [];
  const promises = ids.map(
    (id, i) =>
      new Promise<unknown>((resolve, reject) => {
        const w: Waiter = { resolve, reject, data: datas[i], onProgress: o.onProgress ? (f, s) => o.onProgress!(i, f, s) : undefined };
        own[i] = w;
        st.waiters.set(id, [...(st.waiters.get(id) ?? []), w]);
      }),
  );
  const mine = new Set(ids);
  let cancelled = false;
  const stopOpen = () => {
    cancelled = true;
    const alone = dropOwn(st, ids, own);
    for (const id of alone) void st.queue.remove(id).catch(() => 0); // waiting jobs go; active ones are locked by their worker
    if (alone.length) void st.pub.publish(cancelChannel(st.name), JSON.stringify(alone)).catch(() => 0);
  };
  const onAbort = () => {
    if (o.signal?.reason !== DETACH) return stopOpen();
    // The caller is stopping: stop waiting, leave the tasks to the workers for its next start.
    cancelled = true;
    dropOwn(st, ids, own);
  };
  o.signal?.addEventListener('abort', onAbort, { once: true });
  try {
    // Adding waits (retrying) while Redis is away; the reconcile pass re-adds whatever is lost later.
    await add(st, ids, datas).catch(() => {});
    void reconcile(st);
    const results: R[] = new Array(payloads.length);
    let failure: unknown;
    await Promise.all(
      promises.map((p, i) =>
        p.then(
          (r) => {
            results[i] = r as R;
            if (!cancelled) o.onResult?.(i, r as R);
          },
          (e) => {
            if (failure === undefined) failure = e;
            // The first failure stops the rest of the batch.
            if (!cancelled && !(e instanceof CancelledError)) stopOpen();
          },
        ),
      ),
    );
    if (o.signal?.aborted) throw new CancelledError();
    if (failure !== undefined) throw failure;
    // Stored by the caller: free Redis (unless another batch here still waits for the same piece).
    for (const id of mine) if (!st.waiters.has(id)) void st.queue.remove(id).catch(() => 0);
    return results;
  } finally {
    o.signal?.removeEventListener('abort', onAbort);
  }
}

/**
 * Rejects a batch's outstanding tasks; returns the ids no other batch of this runner waits for
 * (only those may be removed or stopped: an identical scenario's batch shares the ids).
 */
function dropOwn(st: QueueState, ids: string[], own: Waiter[]): string[] {
  const alone: string[] = [];
  ids.forEach((id, i) => {
    const ws = st.waiters.get(id);
    if (!ws || !ws.includes(own[i])) return;
    const rest = ws.filter((w) => w !== own[i]);
    if (rest.length) st.waiters.set(id, rest);
    else {
      st.waiters.delete(id);
      alone.push(id);
    }
    own[i].reject(new CancelledError());
  });
  return alone;
}
