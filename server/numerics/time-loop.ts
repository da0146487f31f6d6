import type { DiffusionCounters, DiffusionStepper } from './diffusion.ts';
import type { ReactionCounters, ReactionStepper } from './reaction.ts';
import { checkFiniteState } from './finite.ts';

/** The fields at the end of a step, as observers see them (do not mutate). */
export interface FieldState {
  /** Time [yr] since the start of the run. */
  readonly t: number;
  /** Insect density per cell, relative to capacity of fully stocked host forest. */
  readonly u: Float64Array;
  /** Remaining host fraction per cell. */
  readonly h: Float64Array;
  /** Steps completed. */
  readonly stepIndex: number;
}

/**
 * Something that watches a run: initialise once, handle after every step, finalise once
 * (the tracker pattern). `handle` may return true to stop the run early (e.g. an event was reached).
 */
export interface Observer {
  initialize?(state: FieldState): void;
  handle(state: FieldState): boolean | void;
  finalize?(state: FieldState): void;
}

/** One step of the whole system (density and host fraction): what the time loop drives. */
export interface FieldStepper {
  /** Advances u and h by dt [yr] in place. */
  step(u: Float64Array, h: Float64Array, dt: number): void;
  /** Counters in the solver-report layout (movement solves; growth substeps). */
  counters(): { diffusion: DiffusionCounters; reaction: ReactionCounters };
}

/**
 * Strang splitting: half growth step, full implicit diffusion step, half growth step.
 *
 * @remarks
 * Second order for smooth problems (Strang 1968, SIAM J. Numer. Anal. 5:506–517), but only about first
 * order near habitat edges where growth differs across the edge (the growth substep breaks the edge
 * conditions; order reduction of splitting methods, Hundsdorfer & Verwer 2003, Numerical Solution of
 * Time-Dependent Advection-Diffusion-Reaction Equations, §IV.3 [MEM for the section]). The engine uses
 * the coupled stepper (coupled.ts); this one is kept for comparison in the convergence tests.
 */
export function splitStepper(diffusion: DiffusionStepper, reaction: ReactionStepper): FieldStepper {
  return {
    step(u, h, dt) {
      reaction.step(u, h, 0.5 * dt);
      diffusion.step(u, dt);
      reaction.step(u, h, 0.5 * dt);
    },
    counters: () => ({ diffusion: { ...diffusion.counters }, reaction: { ...reaction.counters } }),
  };
}

export interface TimeLoopOptions {
  /** End time [yr], > 0. */
  tEnd: number;
  /** Step size [yr], > 0; the last step is shortened to land on tEnd. */
  dt: number;
  observers?: Observer[];
  /** Polled every `pollEvery` steps; returning true cancels the run. */
  shouldCancel?: () => boolean;
  /** Called every `pollEvery` steps with the fraction of simulated time done. */
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
    steps: number;
    diffusion: DiffusionCounters;
    reaction: ReactionCounters;
    wallMs: number;
  };
}

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

/**
 * Time loop with constant steps (the last one shortened to land on tEnd): steps the fields, feeds the
 * observers, polls for cancellation and reports progress. The loop owns no physics: the stepper is built
 * by the caller.
 */
export function runTimeLoop(stepper: FieldStepper, u: Float64Array, h: Float64Array, options: TimeLoopOptions): SolverResult {
  const { tEnd, dt, observers = [], shouldCancel, onProgress, pollEvery = 64 } = options;
  if (!(tEnd > 0) || !(dt > 0)) throw new RangeError(`tEnd and dt must be > 0 (got ${tEnd}, ${dt})`);
  const started = performance.now();
  const state = { t: 0, u, h, stepIndex: 0 };
  for (const o of observers) o.initialize?.(state);
  let status: SolverResult['status'] = 'completed';
  let message = `reached the end time ${tEnd} yr`;
  // Steps are counted, not accumulated, so t lands on tEnd without drift.
  const nSteps = Math.max(1, Math.ceil(tEnd / dt - 1e-9));
  for (let k = 1; k <= nSteps; k++) {
    const tNext = k === nSteps ? tEnd : k * dt;
    const step = k === nSteps ? tEnd - state.t : dt;
    stepper.step(u, h, step);
    state.t = tNext;
    state.stepIndex = k;
    let stop = false;
    for (const o of observers) if (o.handle(state)) stop = true;
    if (stop) {
      status = 'stopped';
      message = `stopped by an observer at t = ${tNext.toPrecision(6)} yr`;
      break;
    }
    if (k % pollEvery === 0) {
      // Non-finite values never become a verdict: the run stops here with the time and the cell (numerics/finite.ts).
      checkFiniteState(u, h, tNext);
      onProgress?.(tNext / tEnd);
      if (shouldCancel?.()) {
        status = 'cancelled';
        message = `cancelled at t = ${tNext.toPrecision(6)} yr`;
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
      steps: state.stepIndex,
      diffusion: counters.diffusion,
      reaction: counters.reaction,
      wallMs: performance.now() - started,
    },
  };
}
