/**
 * Node options for worker threads that load the TypeScript sources: they need the tsx loader. When the
 * process already runs under tsx its options are inherited; otherwise (e.g. inside vitest) the loader is
 * added explicitly. The one place this is decided (the ensemble pool, the evaluation and briefing pools).
 */
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';

/** The tsx loader as a file URL, for `--import`. */
export function tsxLoaderUrl(): string {
  return pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
}

/** execArgv for a worker: the process's own options, with the tsx loader added when it is not already there. */
export function workerExecArgv(): string[] {
  const inherited = process.execArgv;
  if (inherited.some((a) => a.includes('tsx'))) return inherited;
  return [...inherited, '--import', tsxLoaderUrl()];
}
