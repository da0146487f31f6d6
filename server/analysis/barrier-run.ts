/** Moved to server/analysis/run/barrier-run.ts; this re-export stays for one round so other branches keep compiling. */
export * from './run/barrier-run.ts';
