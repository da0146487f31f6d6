/**
 * The inline runner: runs tasks one after another on this thread. The reference every other runner must
 * match bit for bit, and what tests and small evaluations use.
 */
import { CancelledError, type MapOptions, type TaskContext, type TaskKind, type TaskRunner } from './task-runner.ts';
import { taskHandler } from './tasks.ts';

export function makeInlineRunner(): TaskRunner {
  return {
    where: 'this machine, one thread',
    concurrency: 1,
    capacity: () => ({ tasks: 1, text: 'this machine, one thread' }),
    async map<P, R>(kind: TaskKind, payloads: readonly P[], opts: MapOptions<R> = {}): Promise<R[]> {
      const handler = taskHandler(kind);
      const results: R[] = [];
      for (let i = 0; i < payloads.length; i++) {
        if (opts.signal?.aborted) throw new CancelledError();
        const index = i;
        const ctx: TaskContext = { shouldCancel: () => opts.signal?.aborted ?? false, progress: (f, stage) => opts.onProgress?.(index, f, stage) };
        const r = (await handler(payloads[i], ctx)) as R;
        results.push(r);
        opts.onResult?.(i, r);
      }
      return results;
    },
    async close() {},
  };
}
