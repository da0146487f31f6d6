/** Moved to server/analysis/run/trackers.ts; this re-export stays for one round so other branches keep compiling. */
export * from './run/trackers.ts';
