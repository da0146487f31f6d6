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
import { execFileSync } from 'node:child_process';

/**
 * The preload that registers tsx's ES-module hooks in the new thread, as a file URL for `--import`. (On
 * Node 20, `--import tsx/esm` registers them on the main thread only, and `--import tsx` adds the require
 * hook; tsx's register API works in any thread.)
 */
export function workerPreloadUrl(): string {
  return new URL('./worker-hooks.mjs', import.meta.url).href;
}

/**
 * V8's option names (from `node --v8-options`, read once when first needed). V8 options act on the whole
 * process, so threads share them, and Node refuses them in a worker's execArgv
 * (ERR_WORKER_INVALID_EXEC_ARGV): `node --max-old-space-size=… ` or `--single-threaded-gc` would otherwise
 * stop every pool.
 */
let v8Names: Set<string> | null = null;
function isV8Option(option: string): boolean {
  if (v8Names === null) {
    const listing = execFileSync(process.execPath, ['--v8-options'], { encoding: 'utf8' });
    v8Names = new Set([...listing.matchAll(/^\s+--([a-z0-9_-]+)/gm)].map((m) => m[1].replace(/_/g, '-')));
  }
  const name = option.replace(/^--(no-)?/, '').split('=')[0].replace(/_/g, '-');
  return v8Names.has(name);
}

/** Options that give a script inline (dropped with their value). */
const INLINE_SCRIPT = new Set(['--eval', '-e', '--print', '-p']);
/** Options that take the next argument as their value (tsx's entries and a script given inline). */
const WITH_VALUE = new Set(['--require', '-r', '--import', '--loader', '--experimental-loader', ...INLINE_SCRIPT]);

/**
 * execArgv for a worker: the process's own Node options (profiling and the like) without tsx's entries, an
 * inline script or V8's options, and the preload of tsx's ES-module hooks.
 */
export function workerExecArgv(inherited: readonly string[] = process.execArgv, keepV8 = false): string[] {
  const preload = workerPreloadUrl();
  const out: string[] = [];
  for (let i = 0; i < inherited.length; i++) {
    const a = inherited[i];
    if (WITH_VALUE.has(a)) {
      const value = inherited[i + 1] ?? '';
      i++;
      if (INLINE_SCRIPT.has(a) || value.includes('tsx') || value === preload) continue;
      out.push(a, value);
      continue;
    }
    // The "=value" forms (--import=…tsx…, --eval=…), and V8's options (they already hold in every thread).
    if (a.includes('tsx') || /^--(eval|print)=/.test(a) || (!keepV8 && a.startsWith('--') && isV8Option(a))) continue;
    out.push(a);
  }
  return [...out, '--import', preload];
}

/** execArgv for a child process: as for a worker, but V8's options are kept (a process has its own V8). */
export function childProcessExecArgv(inherited: readonly string[] = process.execArgv): string[] {
  return workerExecArgv(inherited, true);
}
