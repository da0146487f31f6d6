/**
 * Steppers: one step of the whole system (density u and host fraction h) over a given dt. The time loop
 * (time-loop.ts) drives a stepper under a step controller (controller.ts); the stepper owns the physics,
 * the controller the step sizes, the observers (observers.ts) what is recorded.
 */
import type { DiffusionCounters, DiffusionStepper } from './diffusion.ts';
import type { ReactionCounters, ReactionStepper } from './reaction.ts';

/** What a step reports to the controller. */
export interface StepReport {
  /**
   * Local error estimate of the step in the controller's norm, scaled so that 1 is the tolerance (≤ 1:
   * acceptable). Steppers without an embedded estimate (the fixed-step TR-BDF2 of coupled.ts) leave it out.
   */
  errorEstimate?: number;
}

/** One step of the whole system (density and host fraction): what the time loop drives. */
export interface FieldStepper {
  /** Advances u and h by dt [yr] in place; may report an error estimate. */
  step(u: Float64Array, h: Float64Array, dt: number): StepReport | void;
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
