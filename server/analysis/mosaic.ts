/** Moved to server/analysis/mosaic/mosaic.ts; this re-export stays for one round so other branches keep compiling. */
export * from './mosaic/mosaic.ts';
