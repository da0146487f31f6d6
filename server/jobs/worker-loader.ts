/**
 * Node options for worker threads and child processes that load the TypeScript sources: they need the tsx
 * loader. The one place this is decided (the ensemble pool, the evaluation, fit and briefing pools, the map
 * job's child process).
 *
 * Workers get tsx's ES-module loader only, never its CommonJS require hook. The pool library first tries
 * `require(file)` on a worker's file and imports it only when that fails; with the require hook in place the
 * require succeeds, and the whole module graph is compiled to CommonJS, whose calls between modules go
 * through module objects. The draws of an ensemble then ran about 1.4 times slower in a worker than on the
 * main thread (measured 2026-12-04: 300 draws of bench (c) on one worker against the same draws inline,
 * paired runs). Without the hook the require fails, the file is imported, and the code is the same
 * ES-module code the main thread runs.
 */
/**
 * The preload that registers tsx's ES-module hooks in the new thread, as a file URL for `--import`. (On
 * Node 20, `--import tsx/esm` registers them on the main thread only, and `--import tsx` adds the require
 * hook; tsx's register API works in any thread.)
 */
export function workerPreloadUrl(): string {
  return new URL('./worker-hooks.mjs', import.meta.url).href;
}

/** Options that take the next argument as their value (tsx's entries and a script given inline). */
const WITH_VALUE = new Set(['--require', '-r', '--import', '--loader', '--experimental-loader', '--eval', '-e', '--print', '-p']);

/**
 * execArgv for a worker: the process's own Node options (memory limits, profiling and the like) without
 * tsx's entries or an inline script, and the preload of tsx's ES-module hooks.
 */
export function workerExecArgv(inherited: readonly string[] = process.execArgv): string[] {
  const preload = workerPreloadUrl();
  const out: string[] = [];
  for (let i = 0; i < inherited.length; i++) {
    const a = inherited[i];
    if (WITH_VALUE.has(a)) {
      const value = inherited[i + 1] ?? '';
      i++;
      if (value.includes('tsx') || value === preload || a === '--eval' || a === '-e' || a === '--print' || a === '-p') continue;
      out.push(a, value);
      continue;
    }
    // The "=value" forms (--import=…tsx…, --eval=…).
    if (a.includes('tsx') || /^--(eval|print)=/.test(a)) continue;
    out.push(a);
  }
  return [...out, '--import', preload];
}
