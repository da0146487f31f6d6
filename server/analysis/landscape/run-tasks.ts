/**
 * The landscape's independent runs as tasks, so that an evaluation spreads them over the task runner
 * (inline, local worker threads, queue workers) like the transect's option runs:
 * - 'landscape-run': the baseline or one band option over the horizon (server/analysis/landscape/run.ts);
 * - 'landscape-hold': the steady-state continuation behind a "holds" verdict (holds.ts), for the options
 *   that need it.
 * A task rebuilds its problem from the payload, so its result depends only on the payload (the step is
 * sequential and its order of operations fixed: the same bits on any thread or machine).
 */
import { registerTask } from '../../jobs/tasks.ts';
import { NO_CONTEXT, type TaskContext } from '../../jobs/task-runner.ts';
import { landscapeProblem, type PointPest, type ProblemOptions } from './problem.ts';
import { runLandscapeProblem } from './run.ts';
import { continueToSteadyState, type HoldSettings } from './holds.ts';
import { landscapeFromJson, rawToJson, type LandscapeJson, type RawRunJson } from './json.ts';
import type { LandscapeOptionResult } from './result.ts';

export const LANDSCAPE_RUN_TASK = 'landscape-run';
export const LANDSCAPE_HOLD_TASK = 'landscape-hold';

export interface LandscapeRunPayload {
  /** The landscape on the model cell. */
  landscape: LandscapeJson;
  pest: PointPest;
  problem: ProblemOptions;
  run: { horizonYears: number; detectionLevel: number };
}

export interface LandscapeHoldPayload {
  landscape: LandscapeJson;
  pest: PointPest;
  problem: ProblemOptions;
  /** The run's final state. */
  u: number[];
  h: number[];
  hold: HoldSettings;
}

export function runTask(p: LandscapeRunPayload, ctx: TaskContext = NO_CONTEXT): RawRunJson {
  const problem = landscapeProblem(landscapeFromJson(p.landscape), p.pest, p.problem);
  const raw = runLandscapeProblem(problem, p.pest, {
    ...p.run,
    shouldCancel: () => ctx.shouldCancel(),
    onProgress: (f) => ctx.progress(f, 'running'),
  });
  return rawToJson(raw);
}

export function holdTask(p: LandscapeHoldPayload, ctx: TaskContext = NO_CONTEXT): LandscapeOptionResult['pinning'] {
  const problem = landscapeProblem(landscapeFromJson(p.landscape), p.pest, p.problem);
  return continueToSteadyState(problem, { u: Float64Array.from(p.u), h: Float64Array.from(p.h) }, p.pest, { ...p.hold, shouldCancel: () => ctx.shouldCancel() });
}

registerTask<LandscapeRunPayload, RawRunJson>(LANDSCAPE_RUN_TASK, runTask);
registerTask<LandscapeHoldPayload, LandscapeOptionResult['pinning']>(LANDSCAPE_HOLD_TASK, holdTask);
