/**
 * Options handed to worker threads and child processes: the process's own Node options are kept, tsx's
 * entries (whose require hook would compile the sources to CommonJS) and an inline script are dropped, and
 * the preload of tsx's module hooks is added once.
 */
import { describe, expect, it } from 'vitest';
import { childProcessExecArgv, workerExecArgv, workerPreloadUrl } from '../../server/jobs/worker-loader.ts';

describe('worker options', () => {
  const preload = workerPreloadUrl();

  it('replaces the tsx command line entries by the module-hook preload', () => {
    const underTsx = ['--require', '/p/node_modules/tsx/dist/preflight.cjs', '--import', 'file:///p/node_modules/tsx/dist/loader.mjs'];
    expect(workerExecArgv(underTsx)).toEqual(['--import', preload]);
    expect(workerExecArgv(['--import', 'tsx'])).toEqual(['--import', preload]);
    expect(workerExecArgv(['--import=tsx'])).toEqual(['--import', preload]);
  });

  it('keeps other Node options and their values, drops an inline script, adds the preload only once', () => {
    const argv = ['--cpu-prof', '--import', 'file:///p/other.mjs', '--eval', 'console.log(1)', '--import', preload];
    expect(workerExecArgv(argv)).toEqual(['--cpu-prof', '--import', 'file:///p/other.mjs', '--import', preload]);
    expect(workerExecArgv([])).toEqual(['--import', preload]);
  });

  it("drops V8's options for threads (Node refuses them there; they already act on every thread) and keeps them for a child process", () => {
    const argv = ['--max-old-space-size=4000', '--single-threaded-gc', '--no-opt', '--stack_size=2000', '--cpu-prof', '--enable-source-maps'];
    expect(workerExecArgv(argv)).toEqual(['--cpu-prof', '--enable-source-maps', '--import', preload]);
    expect(childProcessExecArgv(argv)).toEqual([...argv, '--import', preload]);
  });

  it('a pool starts under V8 options given to the process (they used to stop every worker)', async () => {
    const { makePoolRunner } = await import('../../server/jobs/pool-runner.ts');
    await import('../../server/jobs/task-modules.ts');
    const saved = [...process.execArgv];
    process.execArgv.push('--single-threaded-gc', '--max-old-space-size=3000');
    const pool = makePoolRunner({ threads: 1 });
    try {
      const [r] = await pool.map<object, { value: number | null; moduleFormat: string }>('runner-probe', [{ value: 7 }]);
      expect(r).toMatchObject({ value: 7, moduleFormat: 'module' });
    } finally {
      process.execArgv.splice(0, process.execArgv.length, ...saved);
      await pool.close();
    }
  });

  it('the preload is a file next to the loader', () => {
    expect(preload).toMatch(/^file:\/\/.*\/server\/jobs\/worker-hooks\.mjs$/);
  });
});
