/**
 * Limits on what the web app will compute for one request: grid cells, horizon, options per scenario
 * and wall time. The engine has its own hard limits (MAX_CELLS, MAX_STEPS in problem/discretise.ts);
 * these are the (usually tighter) limits of a shared server. Every limit breach is a LimitError naming
 * the field, the value and the limit.
 */
import { LimitError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { plannedRuns, type PlannedRun } from '../analysis/evaluate/planned-runs.ts';
import { MAX_STEPS } from '../problem/resolution.ts';

export interface WebLimits {
  /** Largest grid of any one run (baseline or option) [cells]. */
  maxCells: number;
  /** Longest horizon [yr]. */
  maxHorizonYears: number;
  /** Most barrier options in one scenario. */
  maxOptions: number;
  /** Longest time one evaluation may compute before it is stopped [s]. */
  wallSeconds: number;
  /** Most evaluations waiting for a worker at once. */
  maxQueued: number;
}

export const DEFAULT_LIMITS: WebLimits = {
  maxCells: 100_000,
  maxHorizonYears: 200,
  maxOptions: 8,
  wallSeconds: 300,
  maxQueued: 20,
};

/**
 * Checks a validated scenario against the limits before it is queued: every full-layout run the evaluation
 * will make (baseline, options, bypass runs, mosaic patterns, ensemble draws; see analysis/evaluate/planned-runs.ts)
 * is counted with the run's own resolution policy, so the count quoted is the one the run would use.
 * @throws LimitError listing every limit the scenario breaks
 */
export function checkLimits(scenario: Scenario, limits: WebLimits): void {
  const problems: Problem[] = [];
  if (scenario.horizonYears > limits.maxHorizonYears) {
    problems.push({
      path: 'horizonYears',
      value: scenario.horizonYears,
      message: `is longer than this server allows (at most ${limits.maxHorizonYears} yr); shorten the horizon`,
    });
  }
  const options = scenario.barrier?.options ?? [];
  if (options.length > limits.maxOptions) {
    problems.push({
      path: 'barrier.options',
      value: `${options.length} options`,
      message: `this server evaluates at most ${limits.maxOptions} options per scenario; split them over two scenarios`,
    });
  }
  if (problems.length === 0) {
    const runs = plannedRuns(scenario);
    const largest = runs.reduce((a, b) => (b.nCells > a.nCells ? b : a));
    if (largest.nCells > limits.maxCells) {
      problems.push({
        path: 'numerics.cellM',
        value: scenario.numerics?.cellM ?? 'automatic',
        message:
          `gives ${largest.nCells} cells; this server allows at most ${limits.maxCells} (largest run: ${largest.label}). ` +
          'Set a larger cell size or use a shorter transect',
      });
    }
    // The engine's own step-count limit, for the evaluation's runs over the horizon.
    const longest = runs.filter((r) => r.years <= scenario.horizonYears).reduce((a, b) => (b.years / b.stepYears > a.years / a.stepYears ? b : a));
    const steps = longest.years / longest.stepYears;
    if (steps > MAX_STEPS) {
      problems.push({
        path: longest.autoStep ? 'horizonYears' : 'numerics.stepYears',
        value: longest.autoStep ? longest.years : longest.stepYears,
        message: `needs ${Math.round(steps)} time steps; the limit is ${MAX_STEPS}. Shorten the horizon or use a longer step`,
      });
    }
  }
  if (problems.length) throw new LimitError(problems);
}

/** The run with the most cells among all the evaluation will make (the first of equals). */
export function largestRun(scenario: Scenario): PlannedRun {
  return plannedRuns(scenario).reduce((a, b) => (b.nCells > a.nCells ? b : a));
}
