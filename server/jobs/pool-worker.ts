/** Worker-thread entry of the pool runner: looks the task kind up in the registry and runs its handler. */
import './task-modules.ts';
import { taskHandler } from './tasks.ts';

export interface PoolTask {
  kind: string;
  payload: unknown;
}

export default function runPoolTask(task: PoolTask): unknown {
  return taskHandler(task.kind)(task.payload);
}
