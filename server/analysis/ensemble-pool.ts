/** Moved to server/analysis/ensemble/ensemble-pool.ts; this re-export stays for one round so other branches keep compiling. */
export * from './ensemble/ensemble-pool.ts';
