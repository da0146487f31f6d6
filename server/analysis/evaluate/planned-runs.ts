/**
 * Every full-layout run an evaluation will make, with the cells and steps it will use, found without running
 * anything: the baseline, each option's run, each option's bypass run (with transport), each mosaic's
 * pattern runs, and the baseline and option runs of every ensemble draw (coarsened). The counts come from
 * the same resolution policy and layouts as the runs (server/problem/), so they are the runs' own
 * `numerics.nCells` (a mosaic pattern that cannot persist is listed though its run is then skipped). Window runs (critical width, width–delay, past the horizon) are stretches of these
 * layouts, or of the same transect with a clearing of another width, at the same cell size: they never need
 * more than the full layout's cells plus one per habitat piece, and are not listed.
 */
import type { Scenario } from '../../model/scenario.ts';
import { layoutOf, buildProblem, type Problem } from '../../problem/problem.ts';
import { cellsOf, chooseResolution, mergedResolution } from '../../problem/resolution.ts';
import { resolve } from '../../problem/resolve.ts';
import { mosaicPatternProblem } from '../mosaic/mosaic.ts';
import { strongAllee } from '../run/barrier-growth.ts';
import { drawScenario, planEnsemble } from '../ensemble/ensemble.ts';

export interface PlannedRun {
  /** What the run is, in words ("baseline", `option "Wide cut"`, `mosaic "Thinning" pattern`, `ensemble draw 12, baseline`). */
  label: string;
  nCells: number;
  stepYears: number;
  /** The step was chosen automatically (a step-count limit then names the horizon, else the step). */
  autoStep: boolean;
  years: number;
}

/** The full-layout runs of one point problem (baseline, options, bypass runs, mosaic patterns). */
export function plannedPointRuns(p: Problem, prefix = '', mosaics = true): PlannedRun[] {
  const s = p.scenario;
  const options = s.barrier?.options ?? [];
  const runs: PlannedRun[] = [];
  const add = (label: string, pieces: ReturnType<typeof layoutOf>, r: ReturnType<typeof chooseResolution>, years: number) =>
    runs.push({ label: prefix + label, nCells: cellsOf(pieces, r), stepYears: r.stepYears, autoStep: r.autoStep, years });
  const base = layoutOf(p);
  add('baseline', base, options.length ? mergedResolution(p, options) : chooseResolution(p, base), p.horizonYears);
  for (const o of options) add(`option "${o.name}"`, layoutOf(p, o), mergedResolution(p, [o]), p.horizonYears);
  if (s.transport) for (const o of options) add(`option "${o.name}" (bypass run)`, layoutOf(p, o), chooseResolution(p, layoutOf(p, o)), p.horizonYears);
  if (mosaics) {
    for (const m of s.mosaics ?? []) {
      if (m.measure === false) continue;
      const h = m.stocking ?? 1;
      // The pattern run, and for a strong Allee effect the run in unbroken forest it is compared with.
      const variants = strongAllee(s.pest.growth, h) ? [m, { ...m, gapM: 0.001, forestM: Math.max(m.forestM + m.gapM, 100) }] : [m];
      variants.forEach((v, k) => {
        const pattern = mosaicPatternProblem(p, v);
        add(`mosaic "${m.name}" ${k === 0 ? 'pattern' : 'unbroken-forest'} run`, pattern.pieces, chooseResolution(pattern.problem, pattern.pieces), pattern.problem.horizonYears);
      });
    }
  }
  return runs;
}

/** Every full-layout run of an evaluation of the scenario, ensemble draws included. */
export function plannedRuns(scenario: Scenario): PlannedRun[] {
  const runs = plannedPointRuns(buildProblem(resolve(scenario)));
  if (scenario.uncertainty) {
    const plan = planEnsemble(scenario);
    for (let i = 0; i < plan.draws; i++) runs.push(...plannedPointRuns(drawScenario(scenario, plan, i).problem, `ensemble draw ${i + 1}, `, false));
  }
  return runs;
}
