/**
 * Process entry: choose where the work runs, build the app, listen, stop gracefully on SIGINT/SIGTERM.
 * Environment: HOST (default 127.0.0.1), PORT (3000), DATA_DIR (./data), WORKERS (evaluations at once),
 * ENSEMBLE_THREADS (the worker threads all computing of this process shares; default: the cores),
 * WALL_SECONDS (longest evaluation), REDIS_URL (hand the work to queue workers, `npm run worker`, instead).
 *
 * Stopping (SIGTERM or Ctrl-C): no new evaluations are accepted, progress streams end, running work stops
 * within a few seconds, and the log lists what was not finished — it stays queued in the database and
 * resumes at the next start. A second signal exits at once.
 * ALLOWED_HOSTS (host names besides the loopback ones that requests may be addressed to, comma-separated).
 * A setting out of range or a DATA_DIR that cannot be written stops the start with one line naming it.
 */
import type { FastifyInstance } from 'fastify';
import { buildApp } from './app.ts';
import { makeQueueRunner } from './jobs/queue-runner.ts';
import { redactedUrl } from './jobs/queue-config.ts';
import type { TaskRunner } from './jobs/task-runner.ts';
import { DataDirError } from './web/store.ts';
import { normaliseHost } from './web/plugins/security.ts';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
if (!Number.isInteger(port) || port < 0 || port > 65535) {
  console.error(`PORT must be a whole number from 0 to 65535 (found ${JSON.stringify(process.env.PORT)})`);
  process.exit(1);
}
/** A setting from the environment: undefined when unset; a clear message and exit 1 when out of range. */
function setting(name: string, wholeNumber: boolean): number | undefined {
  const v = process.env[name];
  if (v === undefined || v === '') return undefined;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x) || (wholeNumber && !Number.isInteger(x))) {
    console.error(`${name} must be ${wholeNumber ? 'a whole number ≥ 1' : 'a number > 0'} (found ${JSON.stringify(v)})`);
    process.exit(1);
  }
  return x;
}
const wallSeconds = setting('WALL_SECONDS', false);
/** Longest time a stop may take before the process exits anyway [ms]. */
const STOP_LIMIT_MS = 10_000;

let runner: TaskRunner | undefined;
const redisUrl = process.env.REDIS_URL;
if (redisUrl) {
  runner = await makeQueueRunner({ url: redisUrl, log: (m) => console.log(m) });
  console.log(`work goes to the queue at ${redactedUrl(redisUrl)} (${runner.where}); start workers with: REDIS_URL=... npm run worker`);
}

/**
 * Host names requests may be addressed to besides 127.0.0.1, localhost and ::1 (DNS-rebinding guard,
 * web/plugins/security.ts): ALLOWED_HOSTS, plus HOST when it is one specific name or address.
 */
function allowedHosts(): string[] {
  const listed = (process.env.ALLOWED_HOSTS ?? '').split(',').map((h) => h.trim()).filter(Boolean);
  for (const h of listed) {
    if (normaliseHost(h) === undefined) {
      console.error(`ALLOWED_HOSTS must be host names or IP addresses separated by commas (found ${JSON.stringify(h)})`);
      process.exit(1);
    }
  }
  const wildcard = ['0.0.0.0', '::', '[::]', ''];
  return wildcard.includes(host) ? listed : [...listed, host];
}

let app: FastifyInstance;
try {
  app = await buildApp({
    runner,
    logger: true,
    dataDir: process.env.DATA_DIR ?? 'data',
    workerThreads: setting('WORKERS', true),
    ensembleThreads: setting('ENSEMBLE_THREADS', true),
    limits: wallSeconds !== undefined ? { wallSeconds } : {},
    allowedHosts: allowedHosts(),
  });
} catch (err) {
  if (err instanceof DataDirError) {
    console.error(err.message);
    process.exit(1);
  }
  throw err;
}
try {
  await app.listen({ host, port });
} catch (err) {
  const code = (err as NodeJS.ErrnoException).code;
  console.error(
    code === 'EADDRINUSE'
      ? `Port ${port} on ${host} is already in use: stop the other program or set PORT to another number.`
      : `Cannot listen on ${host}:${port}: ${(err as Error).message}`,
  );
  await app.close();
  await runner?.close();
  process.exit(1);
}
let stopping = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    if (stopping) {
      console.error(`${signal} again: exiting now`);
      process.exit(1);
    }
    stopping = true;
    app.log.info(`${signal}: stopping (no new evaluations; running work stops within a few seconds)`);
    const hard = setTimeout(() => {
      console.error(`the stop took longer than ${STOP_LIMIT_MS / 1000} s: exiting; unfinished evaluations resume at the next start`);
      process.exit(1);
    }, STOP_LIMIT_MS);
    hard.unref();
    void app
      .close()
      .then(() => runner?.close())
      .then(() => process.exit(0));
  });
}
// Started by a wrapper (npm, a shell) that went away without passing its signal on: stop as on SIGTERM
// rather than keep serving as an orphan nobody can stop with Ctrl-C.
const parentPid = process.ppid;
setInterval(() => {
  if (!stopping && process.ppid !== parentPid) process.emit('SIGTERM');
}, 1_000).unref();
