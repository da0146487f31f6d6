import type { Scenario } from '../model/scenario.ts';
import { pointScenario } from '../model/scenario.ts';
import { evaluateScenario, type EvaluateOptions } from './evaluate.ts';
import { runEnsembleParallel } from './ensemble-pool.ts';
import { analyseBypass, singleRunShare } from './uncertainty.ts';
import type { ResultDocument } from './result.ts';
import { recommendWidth } from './recommended-width.ts';

/**
 * evaluateScenario with the ensemble on a worker pool sized to the cores (or `threads`). The document is
 * the same as evaluateScenario's for the same scenario and seed, apart from wall times and `threads`.
 * Progress and cancel go through the same callbacks.
 */
export async function evaluateScenarioParallel(scenario: Scenario, opts: EvaluateOptions & { threads?: number } = {}): Promise<ResultDocument> {
  if (!scenario.uncertainty) return evaluateScenario(scenario, opts);
  const share = singleRunShare(scenario);
  const doc = evaluateScenario(scenario, {
    ...opts,
    ensemble: 'skip',
    onProgress: (f, stage) => opts.onProgress?.(share * Math.min(f, 0.999), stage),
  });
  const uncertainty = await runEnsembleParallel(scenario, {
    threads: opts.threads,
    shouldCancel: opts.shouldCancel,
    onProgress: (f, stage) => opts.onProgress?.(share + (1 - share) * f, stage),
  });
  const bypass = analyseBypass(pointScenario(scenario), doc.options, uncertainty, opts.shouldCancel);
  opts.onProgress?.(1, 'done');
  const { cautions, recommendedWidth: _single, ...rest } = doc;
  return { ...rest, uncertainty, ...(bypass ? { bypass } : {}), recommendedWidth: recommendWidth({ options: doc.options, uncertainty, bypass }), cautions };
}
