/** Moved to server/analysis/sensitivity/sensitivity.ts; this re-export stays for one round so other branches keep compiling. */
export * from './sensitivity/sensitivity.ts';
