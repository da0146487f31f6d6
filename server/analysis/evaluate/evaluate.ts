import { recommendWidth } from '../recommended-width.ts';
import { finiteOrRefused } from '../finite-guard.ts';
import { TOOL } from '../../version.ts';
import { buildProblem, type Problem } from '../../problem/problem.ts';
import { resolve } from '../../problem/resolve.ts';
import { fingerprint } from '../../model/canonical.ts';
import { pointScenario, type Scenario, type PointScenario } from '../../model/scenario.ts';
import { alleeThreshold, lowDensityRate } from '../../model/growth.ts';
import { linearSpreadSpeed } from '../../problem/discretise.ts';
import { analyseBaseline, analyseOption } from '../verdict/barrier.ts';
import { analyseMosaic } from '../mosaic/mosaic.ts';
import { allCautions } from './cautions.ts';
import { RESULT_VERSION, type OptionResult, type ResultDocument, type UncertaintyResult } from '../result.ts';
import { runEnsemble } from '../ensemble/ensemble.ts';
import { runEnsembleOn } from '../ensemble/chunks.ts';
import type { MosaicResult } from '../result.ts';
import type { TaskRunner } from '../../jobs/task-runner.ts';
import { makeInlineRunner } from '../../jobs/inline-runner.ts';
import { analyseBypass, singleRunShare } from '../bypass/analyse-bypass.ts';

export interface EvaluateOptions {
  /** Polled during runs; returning true cancels (the result then carries status 'cancelled'). */
  shouldCancel?: () => boolean;
  /** Progress in [0, 1] with a short label of the current stage. */
  onProgress?: (fraction: number, stage: string) => void;
  /** Clock for the run date (tests pass a fixed date). */
  now?: () => Date;
}

export interface EvaluateWithRunnerOptions extends EvaluateOptions {
  /** Where splittable work (the ensemble's draws) runs; this thread (the inline runner) by default. */
  runner?: TaskRunner;
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

/** What the single runs at the central values give: baseline, options, mosaics. */
interface SingleRuns {
  baseline: ReturnType<typeof analyseBaseline>;
  options: OptionResult[];
  mosaics: MosaicResult[];
}

/** The single runs at the central values (baseline, each option, each mosaic), with progress in [0, share]. */
function singleRuns(p: Problem, share: number, opts: EvaluateOptions): SingleRuns {
  const s = p.scenario;
  const options = s.barrier?.options ?? [];
  const nRuns = 1 + options.length;
  const progress = (k: number, label: string) => (f: number) => opts.onProgress?.((share * (k + f)) / nRuns, label);
  const baseline = analyseBaseline(p, options, { shouldCancel: opts.shouldCancel, onProgress: progress(0, 'baseline') });
  const optionResults = options.map(
    (o, k) => analyseOption(p, o, { baseline, shouldCancel: opts.shouldCancel, onProgress: (f, stage) => progress(k + 1, stage)(f) }).result,
  );
  const mosaics = (s.mosaics ?? []).map((m) => analyseMosaic(p, m, { shouldCancel: opts.shouldCancel }));
  return { baseline, options: optionResults, mosaics };
}

/** The result document from the stages: single runs, the ensemble (if any) and the bypass section (which uses it). */
function assemble(scenario: Scenario, p: Problem, single: SingleRuns, uncertainty: UncertaintyResult | undefined, opts: EvaluateOptions): ResultDocument {
  const bypass = analyseBypass(p, single.options, uncertainty, opts.shouldCancel);
  opts.onProgress?.(1, 'done');
  return {
    ...documentHeader(scenario, (opts.now?.() ?? new Date()).toISOString()),
    model: modelFacts(p.scenario),
    baseline: single.baseline.summary,
    options: single.options,
    ...(single.mosaics.length ? { mosaics: single.mosaics } : {}),
    ...(uncertainty ? { uncertainty } : {}),
    ...(bypass ? { bypass } : {}),
    recommendedWidth: recommendWidth({ options: single.options, uncertainty, bypass }),
    cautions: allCautions(),
  };
}

/**
 * Evaluates a validated scenario: the problem is built once at the central values; the baseline, every
 * barrier option and every mosaic are analysed on it; an ensemble's draws go to the runner as chunks; the
 * bypass section follows. The orchestrator every front end calls (CLI, web job workers, briefing); the
 * document is the same whatever runner is used, apart from wall times and thread counts.
 */
export async function evaluate(scenario: Scenario, opts: EvaluateWithRunnerOptions = {}): Promise<ResultDocument> {
  // Non-finite numbers never become a verdict (analysis/finite-guard.ts).
  return finiteOrRefused(() => evaluateUnguarded(scenario, opts));
}

async function evaluateUnguarded(scenario: Scenario, opts: EvaluateWithRunnerOptions): Promise<ResultDocument> {
  const p = buildProblem(resolve(scenario));
  const share = singleRunShare(scenario);
  const single = singleRuns(p, share, opts);
  let uncertainty: UncertaintyResult | undefined;
  if (scenario.uncertainty) {
    const runner = opts.runner ?? makeInlineRunner();
    uncertainty = await runEnsembleOn(runner, scenario, {
      shouldCancel: opts.shouldCancel,
      onProgress: (f, stage) => opts.onProgress?.(share + (1 - share) * f, stage),
    });
  }
  return assemble(scenario, p, single, uncertainty, opts);
}

/** {@link evaluate} on this thread, synchronously (tests, scripts): the same stages, the ensemble draw by draw. */
export function evaluateScenario(scenario: Scenario, opts: EvaluateOptions = {}): ResultDocument {
  return evaluateProblem(scenario, buildProblem(resolve(scenario)), opts);
}

/** {@link evaluateScenario} on a problem the caller built from the scenario's central values (tests inspect its cache). */
export function evaluateProblem(scenario: Scenario, p: Problem, opts: EvaluateOptions = {}): ResultDocument {
  const share = singleRunShare(scenario);
  const single = singleRuns(p, share, opts);
  const uncertainty = scenario.uncertainty
    ? runEnsemble(scenario, { shouldCancel: opts.shouldCancel, onProgress: (f, stage) => opts.onProgress?.(share + (1 - share) * f, stage) })
    : undefined;
  return assemble(scenario, p, single, uncertainty, opts);
}
