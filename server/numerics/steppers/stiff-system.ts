/**
 * What an implicit stepper needs from a stiff semi-discretisation y' = f(t, y): the right side, a
 * Jacobian (or an approximation of it) and linear solves with I − c J. The stepper never sees the
 * matrix: a 1-D transect solves tridiagonal systems, a 2-D landscape can solve banded or line-split
 * ones behind the same four calls.
 *
 * Every call works on the components lo…hi−1 only (the active window, see {@link ActiveWindow});
 * components outside are frozen at their values and count as constants in f.
 */
export interface StiffSystem {
  /** Number of unknowns. */
  readonly size: number;
  /** out[lo…hi) = f(t, y)[lo…hi). */
  rhs(t: number, y: Float64Array, out: Float64Array, lo: number, hi: number): void;
  /** Evaluates (and keeps) the Jacobian ∂f/∂y at (t, y). */
  jacobian(t: number, y: Float64Array, lo: number, hi: number): void;
  /** Factorises I − c J for the kept Jacobian (c > 0 [time units]); false when that failed. */
  factor(c: number, lo: number, hi: number): boolean;
  /** Solves (I − c J) x = b in place over lo…hi with the last factorisation. */
  solve(b: Float64Array, lo: number, hi: number): void;
}

/** Counters of an adaptive run, reported in `numerics`. */
export interface StepperCounters {
  /** Accepted steps. */
  accepted: number;
  /** Steps rejected by the error test or by the positivity check. */
  rejected: number;
  /** Steps whose Newton iteration did not converge (step cut, or Jacobian refreshed). */
  newtonFailures: number;
  /** Right-side evaluations. */
  rhsEvaluations: number;
  /** Jacobian evaluations. */
  jacobianEvaluations: number;
  /** Factorisations of I − c J. */
  factorisations: number;
  /** Linear solves with a factorisation. */
  solves: number;
}

/** A contiguous range of active components [lo, hi). */
export interface ActiveWindow {
  lo: number;
  hi: number;
}

/**
 * Counters of an adaptive run (reported in `numerics` of a result): the stepper's, the linear solver's by
 * path, and the active window's. Here, not in adaptive-loop.ts, so that time-loop.ts can name them without an
 * import circle.
 */
export interface AdaptiveCounters extends StepperCounters {
  lockstepFactorisations: number;
  thomasFactorisations: number;
  /** Observer calls (accepted steps and output times). */
  observerCalls: number;
  /** Largest active window [cells] and the grid size. */
  largestWindowCells: number;
  nCells: number;
  rtol: number;
  atol: number;
}
