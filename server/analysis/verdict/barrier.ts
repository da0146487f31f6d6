/**
 * The barrier analysis, split into its rooms: run/baseline.ts (baseline run, settings, option checks),
 * critical-width/, width-delay/, verdict/option.ts (analyseOption) and verdict/reasons.ts. This module
 * re-exports them so callers keep one import.
 */
export * from '../run/baseline.ts';
export * from '../critical-width/critical-width.ts';
export * from '../width-delay/width-delay.ts';
export * from './reasons.ts';
export * from './option.ts';
