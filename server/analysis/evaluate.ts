/** Moved to server/analysis/evaluate/evaluate.ts; this re-export stays for one round so other branches keep compiling. */
export * from './evaluate/evaluate.ts';
