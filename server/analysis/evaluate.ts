import { TOOL } from '../version.ts';
import { fingerprint } from '../model/canonical.ts';
import { pointScenario, type Scenario, type PointScenario } from '../model/scenario.ts';
import { alleeThreshold, lowDensityRate } from '../model/growth.ts';
import { linearSpreadSpeed } from './discretise.ts';
import { analyseBaseline, analyseOption } from './barrier.ts';
import { analyseMosaic } from './mosaic.ts';
import { allCautions } from './cautions.ts';
import { RESULT_VERSION, type OptionResult, type ResultDocument, type UncertaintyResult } from './result.ts';
import { runEnsemble } from './ensemble.ts';
import { analyseBypass, singleRunShare } from './uncertainty.ts';
import { recommendWidth } from './recommended-width.ts';

export interface EvaluateOptions {
  /** Polled during runs; returning true cancels (the result then carries status 'cancelled'). */
  shouldCancel?: () => boolean;
  /** Progress in [0, 1] with a short label of the current stage. */
  onProgress?: (fraction: number, stage: string) => void;
  /** Clock for the run date (tests pass a fixed date). */
  now?: () => Date;
  /**
   * Where the ensemble of a scenario with an `uncertainty` block runs: 'inline' (this thread, default) or
   * 'skip' (the caller runs it, e.g. evaluateScenarioParallel on a worker pool).
   */
  ensemble?: 'inline' | 'skip';
}

/** Model facts printed with every result. */
export function modelFacts(s: PointScenario): ResultDocument['model'] {
  const g = s.pest.growth;
  return {
    growthForm: g.form,
    lowDensityRate: lowDensityRate(g, 1),
    alleeThreshold: alleeThreshold(g, 1),
    linearSpeedKmPerYear: linearSpreadSpeed(s),
    hostDepletion: s.pest.hostKillRate > 0,
  };
}

/** The identifying part of a result document: tool, fingerprint, run date and what the scenario says about itself. */
export function documentHeader(scenario: Scenario, runAt: string) {
  const s = pointScenario(scenario);
  return {
    resultVersion: RESULT_VERSION,
    tool: { ...TOOL },
    scenarioFingerprint: fingerprint(scenario),
    runAt,
    title: s.title,
    description: s.description,
    region: s.region,
    pest: { name: s.pest.name, illustrative: s.pest.illustrative },
    horizonYears: s.horizonYears,
    detectionLevel: s.detectionLevel,
    infestation: { fromKm: s.infestation.fromKm, toKm: s.infestation.toKm, density: s.infestation.density },
  };
}

/**
 * Evaluates a validated scenario: baseline run and one run per barrier option.
 * The function every front end calls (CLI, web routes, workers, briefing).
 */
export function evaluateScenario(scenario: Scenario, opts: EvaluateOptions = {}): ResultDocument {
  const s = pointScenario(scenario);
  const options = s.barrier?.options ?? [];
  const nRuns = 1 + options.length;
  // With an ensemble, the single runs take the first share of the bar and the draws the rest.
  const share = opts.ensemble === 'skip' ? 1 : singleRunShare(scenario);
  const progress = (k: number, label: string) => (f: number) => opts.onProgress?.((share * (k + f)) / nRuns, label);
  const baseline = analyseBaseline(s, options, {
    shouldCancel: opts.shouldCancel,
    onProgress: progress(0, 'baseline'),
  });
  const optionResults: OptionResult[] = options.map(
    (o, k) =>
      analyseOption(s, o, {
        baseline,
        shouldCancel: opts.shouldCancel,
        onProgress: (f, stage) => progress(k + 1, stage)(f),
      }).result,
  );
  const mosaics = (s.mosaics ?? []).map((m) => analyseMosaic(s, m, { shouldCancel: opts.shouldCancel }));
  let uncertainty: UncertaintyResult | undefined;
  if (scenario.uncertainty && opts.ensemble !== 'skip') {
    uncertainty = runEnsemble(scenario, {
      shouldCancel: opts.shouldCancel,
      onProgress: (f, stage) => opts.onProgress?.(share + (1 - share) * f, stage),
    });
  }
  // When the caller runs the ensemble it also adds the bypass section (which uses the ensemble).
  const bypass = opts.ensemble === 'skip' && scenario.uncertainty ? undefined : analyseBypass(s, optionResults, uncertainty, opts.shouldCancel);
  opts.onProgress?.(1, 'done');
  return {
    ...documentHeader(scenario, (opts.now?.() ?? new Date()).toISOString()),
    model: modelFacts(s),
    baseline: baseline.summary,
    options: optionResults,
    ...(mosaics.length ? { mosaics } : {}),
    ...(uncertainty ? { uncertainty } : {}),
    ...(bypass ? { bypass } : {}),
    recommendedWidth: recommendWidth({ options: optionResults, uncertainty, bypass }),
    cautions: allCautions(),
  };
}
