/** Moved to server/analysis/evaluate/planned-runs.ts; this re-export stays for one round so other branches keep compiling. */
export * from './evaluate/planned-runs.ts';
