/** The planned runs of an evaluation: cell counts by hand for a fixed cell size, labels, and ensemble draws listed. */
import { describe, expect, it } from 'vitest';
import { plannedPointRuns, plannedRuns } from '../../../server/analysis/evaluate/planned-runs.ts';
import { parseScenario, type ScenarioInput } from '../../../server/model/scenario.ts';
import { buildProblem } from '../../../server/problem/problem.ts';
import { resolve } from '../../../server/problem/resolve.ts';

// Invented: 10 km of host forest, fixed 100 m cells and 0.05 yr steps, one 500 m cut from km 4.
const input: ScenarioInput = {
  title: 'planned runs test (invented)',
  pest: { name: 'planned runs pest (invented)', diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 1, growth: { form: 'logistic', rate: 1 } },
  transect: { originKm: 0, segments: [{ habitat: 'host-forest', lengthKm: 10, stocking: 1, stemsPerHa: 400 }] },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  horizonYears: 6,
  numerics: { cellM: 100, stepYears: 0.05 },
  barrier: { lengthKm: 1, options: [{ name: 'Test cut', fromKm: 4, widthM: 500 }] },
};

describe('plannedPointRuns', () => {
  it('baseline 100 cells; the option layout 40 + 8 (at least 8 per piece) + 55 = 103 cells', () => {
    const runs = plannedPointRuns(buildProblem(resolve(parseScenario(input))));
    expect(runs).toEqual([
      { label: 'baseline', nCells: 100, stepYears: 0.05, autoStep: false, years: 6 },
      { label: 'option "Test cut"', nCells: 103, stepYears: 0.05, autoStep: false, years: 6 },
    ]);
  });
});

describe('plannedRuns', () => {
  it('adds a baseline and an option run for each ensemble draw, labelled by draw', () => {
    const s = parseScenario({ ...input, pest: { ...input.pest, diffusionHost: { dist: 'uniform', min: 0.8, max: 1.2 } }, uncertainty: { draws: 3, seed: 1 } });
    const runs = plannedRuns(s);
    expect(runs.length).toBe(2 + 3 * 2);
    expect(runs.slice(2).map((r) => r.label)).toEqual([
      'ensemble draw 1, baseline', 'ensemble draw 1, option "Test cut"',
      'ensemble draw 2, baseline', 'ensemble draw 2, option "Test cut"',
      'ensemble draw 3, baseline', 'ensemble draw 3, option "Test cut"',
    ]);
    // Fixed cells are kept in the draws (numerics set in the scenario are not coarsened).
    expect(runs.slice(2).map((r) => r.nCells)).toEqual([100, 103, 100, 103, 100, 103]);
  });
});
