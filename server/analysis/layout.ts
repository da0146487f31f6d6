/** Moved to server/problem/layout.ts; this re-export stays for one round so other branches keep compiling. */
export * from '../problem/layout.ts';
