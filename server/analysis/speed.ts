/** Moved to server/analysis/run/speed.ts; this re-export stays for one round so other branches keep compiling. */
export * from './run/speed.ts';
