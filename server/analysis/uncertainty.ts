/** Moved to server/analysis/bypass/analyse-bypass.ts; this re-export stays for one round so other branches keep compiling. */
export * from './bypass/analyse-bypass.ts';
