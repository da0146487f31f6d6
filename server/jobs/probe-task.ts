/**
 * 'runner-probe': a diagnostic task that keeps one thread busy for `spinMs` and answers which process ran
 * it. `npm run worker -- --check` and the runner tests use it to see that workers take work, that results
 * come back in order, and that cancel and stalled-worker retries behave (a probe with `ignoreCancel`
 * stands for a long computation that does not poll).
 */
import { CancelledError, NO_CONTEXT } from './task-runner.ts';
import { registerTask } from './tasks.ts';

export interface ProbeTask {
  spinMs?: number;
  value?: number;
  ignoreCancel?: boolean;
  /** Fail with this message instead of answering. */
  fail?: string;
}

export interface ProbeResult {
  value: number | null;
  pid: number;
  /** How the thread compiled the sources: 'module' (ES modules, as intended) or 'commonjs' (see jobs/worker-loader.ts). */
  moduleFormat: 'module' | 'commonjs';
}

/** In an ES module `require` and `module` are not defined; a CommonJS compile defines both. */
const MODULE_FORMAT: ProbeResult['moduleFormat'] = typeof module === 'undefined' ? 'module' : 'commonjs';

registerTask('runner-probe', (p: ProbeTask, ctx = NO_CONTEXT): ProbeResult => {
  if (p.fail) throw new Error(p.fail);
  const ms = p.spinMs ?? 0;
  const t0 = Date.now();
  let lastPoll = t0;
  while (Date.now() - t0 < ms) {
    const now = Date.now();
    if (now - lastPoll >= 10) {
      lastPoll = now;
      if (!p.ignoreCancel && ctx.shouldCancel()) throw new CancelledError();
      ctx.progress((now - t0) / ms, 'probe');
    }
  }
  return { value: p.value ?? null, pid: process.pid, moduleFormat: MODULE_FORMAT };
});
