/**
 * What the web server and the queue workers must agree on: the queue's name, the channel that carries
 * cancels, how a Redis address is shown (never with its password), and how connections are opened.
 */
import { Redis } from 'ioredis';
import { TOOL } from '../version.ts';

/** Name of the BullMQ queue of tasks. QUEUE_NAME overrides it (e.g. two deployments on one Redis). */
export function queueName(): string {
  return process.env.QUEUE_NAME || 'barrier-evaluator-tasks';
}

/** Pub/sub channel on which the web server names the tasks to stop (JSON array of job ids). */
export const cancelChannel = (name: string) => `${name}:cancel`;

/** The Redis address without user name or password, for logs and pages. */
export function redactedUrl(url: string): string {
  try {
    const u = new URL(url);
    return `${u.protocol}//${u.hostname}${u.port ? `:${u.port}` : ''}${u.pathname && u.pathname !== '/' ? u.pathname : ''}`;
  } catch {
    return '(unreadable REDIS_URL)';
  }
}

/**
 * A Redis connection for BullMQ: commands wait while the connection is re-established (retried every
 * 0.2–2 s, forever) instead of failing, so a Redis restart only pauses the work.
 */
export function redisConnection(url: string, name: string): Redis {
  return new Redis(url, {
    maxRetriesPerRequest: null,
    enableReadyCheck: true,
    connectionName: name,
    retryStrategy: (times) => Math.min(2_000, 200 * times),
    lazyConnect: false,
  });
}

/** Failure reason of a task a worker stopped because the web server cancelled it. */
export const CANCELLED_REASON = 'cancelled by the web server';

/** BullMQ job ids may not contain ':' (its key separator): task keys use '.' instead. */
export const jobIdOf = (taskKey: string) => taskKey.replace(/:/g, '.');

/** Refusal text of a queue worker handed a task made by another version of the tool. */
export function versionRefusal(jobVersion: string): string {
  return `refused by a queue worker running ${TOOL.name} ${TOOL.version}: this task was made by version ${jobVersion}. Run the same version on the web server and on every worker.`;
}
