/** Moved to server/analysis/run/simulate.ts; this re-export stays for one round so other branches keep compiling. */
export * from './run/simulate.ts';
