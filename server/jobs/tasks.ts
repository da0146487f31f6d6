/**
 * The registry of task kinds: every piece of work a runner can execute, by name. A worker thread, a queue
 * worker on another machine and the inline runner all look handlers up here, so a task means the same
 * thing wherever it runs. Handlers register themselves from the module that owns the work (e.g. the
 * ensemble registers 'ensemble-chunk'); a worker entry imports `server/jobs/task-modules.ts`-style lists of
 * those modules before taking work.
 */
import type { TaskHandler, TaskKind } from './task-runner.ts';

const handlers = new Map<TaskKind, TaskHandler>();

/** Registers the handler of a task kind (once; a second registration of the same kind is a programming error). */
export function registerTask<P, R>(kind: TaskKind, handler: TaskHandler<P, R>): void {
  const known = handlers.get(kind);
  if (known && known !== handler) throw new Error(`task kind '${kind}' is registered twice`);
  handlers.set(kind, handler as TaskHandler);
}

/** The handler of a task kind. @throws Error naming the kind when nothing registered it. */
export function taskHandler(kind: TaskKind): TaskHandler {
  const h = handlers.get(kind);
  if (!h) throw new Error(`unknown task kind '${kind}' (known: ${[...handlers.keys()].join(', ') || 'none'})`);
  return h;
}
