import { spawnSync } from 'node:child_process';

/** True when python3 with scipy can be run (checks against the scipy reference need it). */
export function hasPythonScipy(): boolean {
  const r = spawnSync('python3', ['-c', 'import scipy, numpy'], { encoding: 'utf8' });
  return r.status === 0;
}

/** Runs a python3 script with JSON on stdin and returns its JSON stdout. */
export function runPython<T>(code: string, input: unknown = null): T {
  const r = spawnSync('python3', ['-c', code], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) throw new Error(`python3 failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}
