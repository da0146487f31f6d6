/**
 * Worker-thread entry of the ensemble pool: evaluates a batch of draws. Each draw depends only on the
 * scenario, the seed and its index, so any split of the draws over threads gives the same numbers.
 */
import { canonicalJson } from '../model/canonical.ts';
import type { Scenario } from '../model/scenario.ts';
import { evaluateDraw, planEnsemble, type DrawOutcome, type EnsemblePlan } from './ensemble.ts';

export interface EnsembleTask {
  scenario: Scenario;
  indices: number[];
}

let cachedKey = '';
let cachedPlan: EnsemblePlan | null = null;

/** Evaluates the draws `indices` of the scenario's ensemble (the plan is rebuilt once per scenario and cached). */
export default function evaluateBatch(task: EnsembleTask): DrawOutcome[] {
  const key = canonicalJson(task.scenario);
  if (key !== cachedKey || !cachedPlan) {
    cachedPlan = planEnsemble(task.scenario);
    cachedKey = key;
  }
  const plan = cachedPlan;
  return task.indices.map((i) => evaluateDraw(task.scenario, plan, i));
}
