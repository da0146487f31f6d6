/** Moved to server/problem/discretise.ts; this re-export stays for one round so other branches keep compiling. */
export * from '../problem/discretise.ts';
