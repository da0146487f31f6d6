/**
 * Step controllers: choose the size of each step and accept or reject it on the stepper's report, counting
 * both. Today's engine uses the fixed controller (the resolution policy chooses dt); an adaptive controller
 * implements the same interface (propose from its own step size, judge on `StepReport.errorEstimate`).
 */
import type { StepReport } from './stepper.ts';

export interface StepAttempt {
  /** Step size [yr]. */
  dt: number;
  /** Time at the end of the step [yr] (for the last step exactly tEnd). */
  tNext: number;
}

export interface StepController {
  /** True when `judge` may return false, so the time loop keeps a copy of the state to step again from. */
  readonly mayReject: boolean;
  /** The next step from time t (only called while t < tEnd). */
  propose(t: number): StepAttempt;
  /** Accepts (true) or rejects the step just attempted; a rejected step is redone from the saved state. */
  judge(attempt: StepAttempt, report: StepReport | void): boolean;
  /** Steps accepted and rejected so far. */
  counts(): { accepted: number; rejected: number };
}

/**
 * Constant steps dt, the last one shortened to land on tEnd; every step is accepted. Step k ends at k·dt
 * (counted, not accumulated, so t lands on tEnd without drift); a remainder below 1e-9·dt is not stepped.
 */
export function fixedStepController(tEnd: number, dt: number): StepController {
  if (!(tEnd > 0) || !(dt > 0)) throw new RangeError(`tEnd and dt must be > 0 (got ${tEnd}, ${dt})`);
  const nSteps = Math.max(1, Math.ceil(tEnd / dt - 1e-9));
  let k = 0;
  return {
    mayReject: false,
    propose(t) {
      const last = k + 1 === nSteps;
      return { dt: last ? tEnd - t : dt, tNext: last ? tEnd : (k + 1) * dt };
    },
    judge() {
      k++;
      return true;
    },
    counts: () => ({ accepted: k, rejected: 0 }),
  };
}
