/**
 * Queue worker process (`npm run worker`): takes tasks from the Redis queue named by REDIS_URL and runs
 * them on this machine's worker threads (the local pool), so its own event loop stays free to renew job
 * locks. Start one per machine; it uses every core unless THREADS says otherwise.
 *
 * Environment: REDIS_URL (required), THREADS (tasks at once, default: the cores), QUEUE_LOCK_SECONDS (how
 * long a task stays locked without a renewal before another worker takes it over, default 30),
 * QUEUE_NAME (default barrier-evaluator-tasks).
 *
 * Refuses tasks made by another version of the tool (the version travels in each job). SIGTERM/SIGINT:
 * takes no new task, lets running ones finish for up to STOP_GRACE_MS, then exits; a task cut off is
 * picked up again by another worker once its lock expires.
 */
import { Worker, UnrecoverableError, type Job } from 'bullmq';
import { TOOL } from '../version.ts';
import { fromJsonSafe, toJsonSafe } from './json-safe.ts';
import { makePoolRunner, defaultThreadCount } from './pool-runner.ts';
import { CANCELLED_REASON, cancelChannel, queueName, redactedUrl, redisConnection, versionRefusal } from './queue-config.ts';
import type { QueueJobData } from './queue-runner.ts';

/** How long a stopping worker lets running tasks finish [ms]. */
const STOP_GRACE_MS = 10_000;
/** Shortest interval between two progress updates of one task [ms]. */
const PROGRESS_INTERVAL_MS = 500;

function positive(name: string, fallback: number): number {
  const v = process.env[name];
  if (v === undefined || v === '') return fallback;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x)) {
    console.error(`${name} must be a number > 0 (found ${JSON.stringify(v)})`);
    process.exit(1);
  }
  return x;
}

const url = process.env.REDIS_URL;
if (!url) {
  console.error('REDIS_URL is not set: give the address of the Redis server the web server uses, e.g. REDIS_URL=redis://10.0.0.5:6379 npm run worker');
  process.exit(1);
}
const threads = Math.floor(positive('THREADS', defaultThreadCount()));
const lockMs = positive('QUEUE_LOCK_SECONDS', 30) * 1000;
const name = queueName();
const shown = redactedUrl(url);
// All threads started (and their code loaded) before the first task arrives.
const pool = makePoolRunner({ threads, minThreads: threads });
const active = new Map<string, AbortController>();

async function processTask(job: Job<QueueJobData>): Promise<unknown> {
  const { kind, payload, toolVersion } = job.data;
  if (toolVersion !== TOOL.version) {
    const why = versionRefusal(toolVersion);
    console.error(`task ${job.id} ${why}`);
    throw new UnrecoverableError(why);
  }
  const ac = new AbortController();
  active.set(job.id!, ac);
  let last = 0;
  try {
    const [result] = await pool.map(kind, [fromJsonSafe(payload)], {
      signal: ac.signal,
      onProgress: (_i, fraction, stage) => {
        const now = Date.now();
        if (now - last < PROGRESS_INTERVAL_MS) return;
        last = now;
        void job.updateProgress({ fraction, stage }).catch(() => {});
      },
    });
    return toJsonSafe(result);
  } catch (e) {
    if (ac.signal.aborted) throw new UnrecoverableError(CANCELLED_REASON);
    // A computation that fails fails again: no retry.
    throw new UnrecoverableError(e instanceof Error ? e.message : String(e));
  } finally {
    active.delete(job.id!);
  }
}

const worker = new Worker<QueueJobData>(name, processTask, {
  connection: redisConnection(url, 'barrier-queue-worker'),
  concurrency: threads,
  lockDuration: lockMs,
  stalledInterval: Math.max(500, lockMs / 2),
  // A task whose worker died is put back up to this many times before it is given up.
  maxStalledCount: 3,
});
let trouble = false;
worker.on('error', (e) => {
  if (!trouble) console.error(`queue unavailable (Redis at ${shown}: ${e.message}), retrying`);
  trouble = true;
});
worker.on('ready', () => {
  if (trouble) console.log(`queue at ${shown} reachable again`);
  trouble = false;
});

const sub = redisConnection(url, 'barrier-queue-worker-cancel');
sub.on('error', () => {});
await sub.subscribe(cancelChannel(name));
sub.on('message', (_channel, text) => {
  try {
    for (const id of JSON.parse(text) as string[]) active.get(id)?.abort();
  } catch {
    // not ours
  }
});

await worker.waitUntilReady();
console.log(`queue worker ready: ${threads} thread${threads === 1 ? '' : 's'}, ${TOOL.name} ${TOOL.version}, queue "${name}" at ${shown} (pid ${process.pid})`);

let stopping = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    if (stopping) process.exit(1);
    stopping = true;
    console.log(`stopping: no new tasks; ${active.size} running task(s) get up to ${STOP_GRACE_MS / 1000} s to finish`);
    const hard = setTimeout(() => {
      console.log('stopping now: unfinished tasks go back to the queue when their lock expires');
      process.exit(0);
    }, STOP_GRACE_MS);
    hard.unref();
    void worker
      .close()
      .then(() => Promise.allSettled([pool.close(), sub.quit()]))
      .then(() => process.exit(0));
  });
}
