/**
 * Child-process entry of a landscape evaluation (forked by landscape-jobs.ts): one task in, progress
 * messages and one result out over IPC (advanced serialisation, so byte arrays pass as they are), then exit.
 * A process rather than a worker thread: the GeoTIFF reader does not load inside a piscina thread here, and
 * cancel is a plain kill (its worker threads go with it).
 * The server runs one map evaluation at a time, so the child takes the machine's cores for its runs (the
 * baseline and every option side by side, on a pool of its own: the same numbers as one thread).
 */
import run, { type LandscapeTask } from './landscape-worker.ts';
import { makePoolRunner, defaultThreads } from '../jobs/pool-runner.ts';

process.once('message', (task: Omit<LandscapeTask, 'port' | 'runner'>) => {
  const runner = makePoolRunner({ threads: defaultThreads() });
  void run({ ...task, runner, report: (fraction, message) => process.send?.({ type: 'progress', fraction, message }) }).then(
    (result) => process.send?.({ type: 'result', result }, () => process.exit(0)),
    (err: Error) => process.send?.({ type: 'result', result: { ok: false, code: 'FAILED', message: `the evaluation stopped: ${err.message}`, problems: [] } }, () => process.exit(1)),
  );
});
