/**
 * Options handed to worker threads and child processes: the process's own Node options are kept, tsx's
 * entries (whose require hook would compile the sources to CommonJS) and an inline script are dropped, and
 * the preload of tsx's module hooks is added once.
 */
import { describe, expect, it } from 'vitest';
import { workerExecArgv, workerPreloadUrl } from '../../server/jobs/worker-loader.ts';

describe('worker options', () => {
  const preload = workerPreloadUrl();

  it('replaces the tsx command line entries by the module-hook preload', () => {
    const underTsx = ['--require', '/p/node_modules/tsx/dist/preflight.cjs', '--import', 'file:///p/node_modules/tsx/dist/loader.mjs'];
    expect(workerExecArgv(underTsx)).toEqual(['--import', preload]);
    expect(workerExecArgv(['--import', 'tsx'])).toEqual(['--import', preload]);
    expect(workerExecArgv(['--import=tsx'])).toEqual(['--import', preload]);
  });

  it('keeps other Node options and their values, drops an inline script, adds the preload only once', () => {
    const argv = ['--max-old-space-size=4000', '--cpu-prof', '--import', 'file:///p/other.mjs', '--eval', 'console.log(1)', '--import', preload];
    expect(workerExecArgv(argv)).toEqual(['--max-old-space-size=4000', '--cpu-prof', '--import', 'file:///p/other.mjs', '--import', preload]);
    expect(workerExecArgv([])).toEqual(['--import', preload]);
  });

  it('the preload is a file next to the loader', () => {
    expect(preload).toMatch(/^file:\/\/.*\/server\/jobs\/worker-hooks\.mjs$/);
  });
});
