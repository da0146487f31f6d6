/** Moved to server/analysis/bypass/bypass.ts; this re-export stays for one round so other branches keep compiling. */
export * from './bypass/bypass.ts';
