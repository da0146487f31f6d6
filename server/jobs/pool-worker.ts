/**
 * Worker-thread entry of the local pool (piscina): runs one task of any registered kind. Cancel is a shared
 * flag (one per batch) polled through the task context; progress goes back on a MessagePort, at most every
 * PROGRESS_INTERVAL_MS.
 */
import type { MessagePort } from 'node:worker_threads';
import './task-modules.ts';
import { taskHandler } from './tasks.ts';
import type { TaskContext } from './task-runner.ts';

export interface PoolTask {
  kind: string;
  payload: unknown;
  /** Int32Array target; element 0 set to 1 cancels the batch. */
  cancel: SharedArrayBuffer;
  /** Progress messages {fraction, stage}; absent when nobody listens. */
  port?: MessagePort;
}

/** Shortest interval between two progress messages of one task [ms]. */
const PROGRESS_INTERVAL_MS = 150;

export default async function runPoolTask(task: PoolTask): Promise<unknown> {
  const flag = new Int32Array(task.cancel);
  let last = 0;
  const ctx: TaskContext = {
    shouldCancel: () => Atomics.load(flag, 0) !== 0,
    progress(fraction, stage) {
      if (!task.port) return;
      const now = Date.now();
      if (now - last < PROGRESS_INTERVAL_MS && fraction < 1) return;
      last = now;
      task.port.postMessage({ fraction, stage });
    },
  };
  try {
    if (ctx.shouldCancel()) throw new Error('cancelled');
    return await taskHandler(task.kind)(task.payload, ctx);
  } finally {
    task.port?.close();
  }
}
