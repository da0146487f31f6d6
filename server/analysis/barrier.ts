/** Moved to server/analysis/verdict/barrier.ts; this re-export stays for one round so other branches keep compiling. */
export * from './verdict/barrier.ts';
