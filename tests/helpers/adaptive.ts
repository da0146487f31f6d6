/**
 * Runs a test scenario's baseline layout with the adaptive NDF loop (numerics/steppers/adaptive-loop.ts)
 * directly, with the analysis trackers as observers: what the phase-1 tests of the adaptive integrator use.
 */
import { buildLayout } from '../../server/problem/layout.ts';
import { discretise, chooseResolution, type TransectProblem } from '../../server/problem/discretise.ts';
import { ArrivalTracker, FrontTracker } from '../../server/analysis/run/trackers.ts';
import { makeDiffusionOperator } from '../../server/numerics/diffusion.ts';
import { runAdaptiveLoop, windowFloor, type AdaptiveLoopOptions, type AdaptiveResult } from '../../server/numerics/steppers/adaptive-loop.ts';
import { lowDensityRate } from '../../server/model/growth.ts';
import type { PointScenario } from '../../server/model/scenario.ts';
import type { Observer } from '../../server/numerics/time-loop.ts';

export interface AdaptiveRun {
  problem: TransectProblem;
  u: Float64Array;
  h: Float64Array;
  result: AdaptiveResult;
  front: FrontTracker;
  arrivals: ArrivalTracker;
}

export function runAdaptiveScenario(
  s: PointScenario,
  opts: Partial<AdaptiveLoopOptions> & { windowed?: boolean; cellKm?: number; extraObservers?: Observer[]; initial?: (p: TransectProblem) => Float64Array } = {},
): AdaptiveRun {
  const pieces = buildLayout(s);
  const auto = chooseResolution(s, pieces);
  const problem = discretise(s, pieces, { ...auto, cellKm: opts.cellKm ?? auto.cellKm });
  const op = makeDiffusionOperator(problem.grid, problem.diffusionAtCells, problem.residenceAtCells, problem.ends);
  const u = opts.initial ? opts.initial(problem) : Float64Array.from(problem.u0);
  const h = Float64Array.from(problem.stockingAtCells);
  const front = new FrontTracker(problem.grid, s.detectionLevel);
  const arrivals = new ArrivalTracker(problem.grid, s.sites.map((x) => x.atKm), s.detectionLevel);
  const rtol = opts.rtol ?? 1e-5;
  const window =
    opts.windowed === false ? null : { floor: windowFloor(s.detectionLevel, lowDensityRate(s.pest.growth, 1), s.horizonYears), hostFloor: 1e-6 };
  const result = runAdaptiveLoop(
    op,
    { hostAtCells: problem.hostAtCells, mortalityAtCells: problem.mortalityAtCells, perCapita: problem.perCapita, hostKillRate: problem.hostKillRate },
    u,
    h,
    { tEnd: s.horizonYears, atol: rtol * 1e-3, window, outputEvery: 0.25, ...opts, rtol, observers: [front, arrivals, ...(opts.extraObservers ?? [])] },
  );
  return { problem, u, h, result, front, arrivals };
}
