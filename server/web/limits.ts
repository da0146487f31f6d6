/**
 * Limits on what the web app will compute for one request: grid cells, horizon, options per scenario
 * and wall time. The engine has its own hard limits (MAX_CELLS, MAX_STEPS in analysis/discretise.ts);
 * these are the (usually tighter) limits of a shared server. Every limit breach is a LimitError naming
 * the field, the value and the limit.
 */
import { LimitError, type Problem } from '../model/errors.ts';
import { pointScenario, type Scenario } from '../model/scenario.ts';
import { buildLayout } from '../analysis/layout.ts';
import { discretise } from '../analysis/discretise.ts';

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
 * Checks a validated scenario against the limits before it is queued.
 * The grid size is found by building each layout's grid (cheap next to a run), so the count is the one the
 * run would use.
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
    const point = pointScenario(scenario);
    const layouts = [undefined, ...(point.barrier?.options ?? [])];
    for (const option of layouts) {
      // discretise throws its own LimitError above the engine's hard limits.
      const nCells = discretise(point, buildLayout(point, option)).grid.nCells;
      if (nCells > limits.maxCells) {
        problems.push({
          path: 'numerics.cellM',
          value: point.numerics.cellM ?? 'automatic',
          message:
            `gives ${nCells} cells${option ? ` with option "${option.name}"` : ''}; this server allows at most ${limits.maxCells}. ` +
            'Set a larger cell size or use a shorter transect',
        });
        break;
      }
    }
  }
  if (problems.length) throw new LimitError(problems);
}
