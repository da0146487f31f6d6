/** Moved to server/analysis/evaluate/cautions.ts; this re-export stays for one round so other branches keep compiling. */
export * from './evaluate/cautions.ts';
