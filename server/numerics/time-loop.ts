/**
 * The time loop: drives a stepper (stepper.ts) under a step controller (controller.ts), hands every accepted
 * step to the observers (observers.ts), polls for cancellation and reports progress. It owns no physics and
 * no step-size policy. Re-exports the pieces so callers import the time-integration vocabulary from here.
 */
import type { DiffusionCounters, DiffusionStepper } from './diffusion.ts';
import type { ReactionCounters, ReactionStepper } from './reaction.ts';
import { fixedStepController, type StepController } from './controller.ts';
import { splitStepper, type FieldStepper } from './stepper.ts';
import type { FieldState, Observer } from './observers.ts';
import type { AdaptiveCounters } from './steppers/stiff-system.ts';
import { checkFiniteState } from './finite.ts';

export type { FieldStepper, StepReport } from './stepper.ts';
export { splitStepper } from './stepper.ts';
export type { StepController, StepAttempt } from './controller.ts';
export { fixedStepController } from './controller.ts';
export type { FieldState, Observer } from './observers.ts';
export { Schedule, LevelCrossings, interpolateCrossing, firstPassage } from './observers.ts';

export interface TimeLoopOptions {
  /** End time [yr], > 0. */
  tEnd: number;
  /** Step size [yr], > 0, for the fixed controller (the last step is shortened to land on tEnd). */
  dt: number;
  /** Step controller; fixed steps of `dt` by default. */
  controller?: StepController;
  observers?: Observer[];
  /** Polled every `pollEvery` accepted steps; returning true cancels the run. */
  shouldCancel?: () => boolean;
  /** Called every `pollEvery` accepted steps with the fraction of simulated time done. */
  onProgress?: (fraction: number) => void;
  pollEvery?: number;
}

/** Solver report in the manner of an ODE result object: status, message and counters. */
export interface SolverResult {
  status: 'completed' | 'stopped' | 'cancelled';
  message: string;
  /** Time reached [yr]. */
  t: number;
  info: {
    /** Accepted steps. */
    steps: number;
    /** Steps the controller rejected and redid (0 with fixed steps). */
    rejectedSteps: number;
    diffusion: DiffusionCounters;
    reaction: ReactionCounters;
    wallMs: number;
    /** Counters of the adaptive integrator (numerics/steppers/adaptive-loop.ts), when it ran. */
    adaptive?: AdaptiveCounters;
  };
}

/** Rejections in a row after which the loop gives up (a controller that cannot find an acceptable step). */
const MAX_REJECTIONS_IN_A_ROW = 50;

/** Strang-split time loop (see {@link splitStepper}); kept for comparisons. */
export function runSplitTimeLoop(
  diffusion: DiffusionStepper,
  reaction: ReactionStepper,
  u: Float64Array,
  h: Float64Array,
  options: TimeLoopOptions,
): SolverResult {
  return runTimeLoop(splitStepper(diffusion, reaction), u, h, options);
}

/** Runs u and h (in place) from t = 0 to tEnd, or until an observer stops the run or it is cancelled. */
export function runTimeLoop(stepper: FieldStepper, u: Float64Array, h: Float64Array, options: TimeLoopOptions): SolverResult {
  const { tEnd, dt, observers = [], shouldCancel, onProgress, pollEvery = 64 } = options;
  if (!(tEnd > 0) || !(dt > 0)) throw new RangeError(`tEnd and dt must be > 0 (got ${tEnd}, ${dt})`);
  const controller = options.controller ?? fixedStepController(tEnd, dt);
  const started = performance.now();
  const state = { t: 0, tPrevious: 0, u, h } satisfies FieldState;
  for (const o of observers) o.initialize?.(state);
  let status: SolverResult['status'] = 'completed';
  let message = `reached the end time ${tEnd} yr`;
  // Saved start of step, only when the controller may ask for a step to be redone.
  const saved = controller.mayReject ? { u: new Float64Array(u.length), h: new Float64Array(h.length) } : null;
  let accepted = 0;
  let inARow = 0;
  while (state.t < tEnd) {
    const attempt = controller.propose(state.t);
    saved?.u.set(u);
    saved?.h.set(h);
    const report = stepper.step(u, h, attempt.dt);
    if (!controller.judge(attempt, report)) {
      u.set(saved!.u);
      h.set(saved!.h);
      if (++inARow > MAX_REJECTIONS_IN_A_ROW) throw new RangeError(`step controller rejected ${inARow} steps in a row at t = ${state.t}`);
      continue;
    }
    inARow = 0;
    state.tPrevious = state.t;
    state.t = attempt.tNext;
    accepted++;
    let stop = false;
    for (const o of observers) if (o.handle(state)) stop = true;
    if (stop) {
      status = 'stopped';
      message = `stopped by an observer at t = ${state.t.toPrecision(6)} yr`;
      break;
    }
    if (accepted % pollEvery === 0) {
      // Non-finite values never become a verdict: the run stops here with the time and the cell (numerics/finite.ts).
      checkFiniteState(u, h, state.t);
      onProgress?.(state.t / tEnd);
      if (shouldCancel?.()) {
        status = 'cancelled';
        message = `cancelled at t = ${state.t.toPrecision(6)} yr`;
        break;
      }
    }
  }
  checkFiniteState(u, h, state.t);
  for (const o of observers) o.finalize?.(state);
  const counters = stepper.counters();
  return {
    status,
    message,
    t: state.t,
    info: {
      steps: accepted,
      rejectedSteps: controller.counts().rejected,
      diffusion: counters.diffusion,
      reaction: counters.reaction,
      wallMs: performance.now() - started,
    },
  };
}
