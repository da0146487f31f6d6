/** Moved to server/analysis/run/barrier-growth.ts; this re-export stays for one round so other branches keep compiling. */
export * from './run/barrier-growth.ts';
