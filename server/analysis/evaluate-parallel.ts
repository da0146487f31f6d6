/** Merged into server/analysis/evaluate/evaluate.ts (evaluate with a runner); this re-export stays for one round. */
export { evaluateScenarioParallel } from './evaluate/evaluate.ts';
