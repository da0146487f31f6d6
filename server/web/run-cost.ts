/**
 * What makes an evaluation long: grid cells × time steps per run. When a run is stopped at the wall-time
 * limit the message names the setting that drives the cost — the horizon, the grid (cells) or a high
 * mortality off the host forest (which forces short time steps) — rather than always the horizon.
 */
import type { Problem } from '../model/errors.ts';
import { habitatCoefficients } from '../model/habitat.ts';
import { pointScenario, type Scenario } from '../model/scenario.ts';
import { buildLayout } from '../problem/layout.ts';
import { chooseResolution, discretise, growthRateScale } from '../problem/discretise.ts';

/** Cells and steps of a run below which neither is called the cause (a few hundred ms of computing). */
const TYPICAL_CELLS = 2_000;
const TYPICAL_STEPS = 2_000;

export interface RunCost {
  cells: number;
  steps: number;
  stepYears: number;
  /** Which bound set the time step: the user's value, growth/host kill, or mortality off the host forest. */
  stepSetBy: 'setting' | 'growth' | 'mortality';
  /** Path and value of the largest mortality present (when it sets the step). */
  mortality: { path: string; value: number } | null;
}

/** The largest run (cells × steps) among the baseline and the options. */
export function runCost(scenario: Scenario): RunCost {
  const s = pointScenario(scenario);
  let worst: RunCost | null = null;
  for (const option of [undefined, ...(s.barrier?.options ?? [])]) {
    const pieces = buildLayout(s, option);
    const res = chooseResolution(s, pieces);
    const cells = discretise(s, pieces, res).grid.nCells;
    const steps = Math.ceil(s.horizonYears / res.stepYears);
    let mortality: RunCost['mortality'] = null;
    for (const habitat of new Set(pieces.map((p) => p.habitat))) {
      if (habitat === 'host-forest') continue;
      const m = habitatCoefficients(s.pest, habitat).mortality;
      if (m > (mortality?.value ?? 0)) mortality = { path: habitat === 'clearing' ? 'pest.mortalityOpen' : 'pest.mortalityNonHost', value: m };
    }
    const growthStep = 0.05 / Math.max(growthRateScale(s.pest.growth), s.pest.hostKillRate);
    const stepSetBy: RunCost['stepSetBy'] = !res.autoStep ? 'setting' : mortality && 0.5 / mortality.value < growthStep ? 'mortality' : 'growth';
    const cost: RunCost = { cells, steps, stepYears: res.stepYears, stepSetBy, mortality: stepSetBy === 'mortality' ? mortality : null };
    if (!worst || cost.cells * cost.steps > worst.cells * worst.steps) worst = cost;
  }
  return worst!;
}

/** The problem shown when an evaluation hit the wall-time limit: the setting that made it long. */
export function longRunProblem(scenario: Scenario, seconds: number): Problem {
  const c = runCost(scenario);
  const head = `the evaluation needed more than the ${seconds} s wall-time limit`;
  const cellsShare = c.cells / TYPICAL_CELLS;
  const stepsShare = c.steps / TYPICAL_STEPS;
  if (cellsShare >= stepsShare) {
    return {
      path: 'numerics.cellM',
      value: scenario.numerics?.cellM ?? 'automatic',
      message: `${head}: its runs have up to ${c.cells} grid cells; set a larger cell size or use a shorter transect`,
    };
  }
  if (c.stepSetBy === 'mortality' && c.mortality) {
    return {
      path: c.mortality.path,
      value: c.mortality.value,
      message: `${head}: a mortality of ${c.mortality.value}/yr off the host forest needs time steps of ${c.stepYears.toPrecision(2)} yr, ${c.steps} steps per run; a lower mortality (if the pest allows) or a shorter horizon runs faster`,
    };
  }
  if (c.stepSetBy === 'setting') {
    return { path: 'numerics.stepYears', value: c.stepYears, message: `${head}: time steps of ${c.stepYears} yr give ${c.steps} steps per run; use a longer step or a shorter horizon` };
  }
  return {
    path: 'horizonYears',
    value: scenario.horizonYears,
    message: `${head}: ${c.steps} time steps per run over ${scenario.horizonYears} yr; shorten the horizon, use fewer options or a larger cell size`,
  };
}
