/**
 * Observers of a run: initialised once, handed the state after every accepted step, finalised once. They are
 * scheduled by time, never by step index, so they work the same under a fixed or an adaptive controller:
 * `Schedule` fires at the first step ending at or after each due time, and `LevelCrossings` dates the first
 * passage of a level between two step ends by the dense output (linear interpolation in time of the watched
 * value between the start and the end of the step).
 */

/** The fields at the end of an accepted step, as observers see them (do not mutate). */
export interface FieldState {
  /** Time [yr] since the start of the run (end of the step). */
  readonly t: number;
  /** Start time of the step just taken [yr] (equal to t at initialisation). */
  readonly tPrevious: number;
  /** Insect density per cell, relative to capacity of fully stocked host forest. */
  readonly u: Float64Array;
  /** Remaining host fraction per cell. */
  readonly h: Float64Array;
  /**
   * Dense output: the density of one cell at a time in [tPrevious, t] (the integrator's interpolating
   * polynomial over the step), when the integrator has one; absent for fixed steps.
   */
  readonly densityAt?: (cell: number, t: number) => number;
  /**
   * Dense output of the whole state at a time in [tPrevious, t], written into u and h (cells the integrator
   * skips keep the values they hold, so pass copies of this state's u and h); absent for fixed steps.
   */
  readonly stateAt?: (t: number, u: Float64Array, h: Float64Array) => void;
}

/**
 * Something that watches a run: initialise once, handle after every accepted step, finalise once
 * (the tracker pattern). `handle` may return true to stop the run early (e.g. an event was reached).
 */
export interface Observer {
  initialize?(state: FieldState): void;
  handle(state: FieldState): boolean | void;
  finalize?(state: FieldState): void;
}

/** Two times closer than this fraction of the later one count as equal (round-off of step counting). */
const SAME_TIME = 1e-12;

/**
 * Fires at the first step ending at or after each due time: every `periodYears` from `startYears`
 * (`periodic`), or at a list of target times (`at`). With fixed steps dt and a period of n·dt this is every
 * n-th step.
 */
export class Schedule {
  private k = 0;
  private constructor(
    private readonly dueAt: (k: number) => number,
    private readonly count: number,
    private readonly tolerance: number,
  ) {}
  static periodic(periodYears: number, startYears = 0): Schedule {
    if (!(periodYears > 0)) throw new RangeError(`period must be > 0 (got ${periodYears})`);
    return new Schedule((k) => startYears + (k + 1) * periodYears, Infinity, SAME_TIME);
  }
  /** Target times in increasing order; `toleranceYears` absorbs round-off between target and step times. */
  static at(targetsYears: readonly number[], toleranceYears = 1e-9): Schedule {
    return new Schedule((k) => targetsYears[k], targetsYears.length, toleranceYears);
  }
  /** The next due time (Infinity when none is left). */
  next(): number {
    return this.k < this.count ? this.dueAt(this.k) : Infinity;
  }
  /** Number of due times that time t has reached (and consumes them); 0 when none is due. */
  take(t: number): number {
    let n = 0;
    while (this.k < this.count) {
      const due = this.dueAt(this.k);
      const tol = this.tolerance === SAME_TIME ? SAME_TIME * Math.abs(due) : this.tolerance;
      if (t < due - tol) break;
      this.k++;
      n++;
    }
    return n;
  }
  /** True when time t has reached a due time (consumes every due time passed). */
  due(t: number): boolean {
    return this.take(t) > 0;
  }
}

/**
 * First upward passage of a level by each of several watched values, dated by the dense output between step
 * ends (linear in time; a value already at the level at the start is dated at the start).
 */
export class LevelCrossings {
  readonly times: (number | null)[];
  private readonly last: Float64Array;
  private lastT = 0;
  constructor(
    n: number,
    private readonly level: number,
  ) {
    this.times = new Array<number | null>(n).fill(null);
    this.last = new Float64Array(n);
  }
  /** Values at the start of the run. */
  start(t: number, values: (k: number) => number, markAtStart = true): void {
    for (let k = 0; k < this.last.length; k++) {
      const now = values(k);
      this.last[k] = now;
      if (markAtStart && now >= this.level) this.times[k] = t;
    }
    this.lastT = t;
  }
  /**
   * Values at the end of a step ending at t (the step began at the previous call's time). With `valueAt`
   * (value k at a time inside the step, from the integrator's dense output) a passage is dated by a root
   * of the interpolant; without it, linearly.
   */
  update(t: number, values: (k: number) => number, valueAt?: (k: number, t: number) => number): void {
    for (let k = 0; k < this.last.length; k++) {
      const now = values(k);
      if (this.times[k] === null && now >= this.level) {
        this.times[k] = valueAt
          ? firstPassage((tq) => valueAt(k, tq), this.lastT, this.last[k], t, now, this.level)
          : interpolateCrossing(this.lastT, this.last[k], t, now, this.level);
      }
      this.last[k] = now;
    }
    this.lastT = t;
  }
  /** True once every value has passed the level. */
  allPassed(): boolean {
    return this.times.every((x) => x !== null);
  }
}

/** Time in [t0, t1] where the linear interpolant from v0 to v1 reaches `level` (t1 when it does not rise). */
export function interpolateCrossing(t0: number, v0: number, t1: number, v1: number, level: number): number {
  const frac = v1 > v0 ? (level - v0) / (v1 - v0) : 1;
  return t0 + Math.min(1, Math.max(0, frac)) * (t1 - t0);
}

/**
 * Time in [t0, t1] where f reaches `level`, given f(t0) = v0 < level ≤ v1 = f(t1) (the passage, when f
 * rises through the level once in the step, as it does for steps resolving the front): the Illinois variant of
 * regula falsi (Dowell & Jarratt 1971, BIT 11:168–174), which keeps the bracket and converges superlinearly.
 * Stops when the bracket is below 1e-9 of the interval or f is within 1e-12 relative of the level; returns
 * the linear estimate when v0 is not below the level (a value already at it).
 */
export function firstPassage(f: (t: number) => number, t0: number, v0: number, t1: number, v1: number, level: number): number {
  if (!(v0 < level) || !(t1 > t0)) return interpolateCrossing(t0, v0, t1, v1, level);
  let a = t0;
  let fa = v0 - level;
  let b = t1;
  let fb = v1 - level;
  let side = 0;
  const tolT = 1e-9 * (t1 - t0);
  for (let it = 0; it < 60 && b - a > tolT; it++) {
    const c = (a * fb - b * fa) / (fb - fa);
    const fc = f(c) - level;
    if (!Number.isFinite(fc)) break;
    if (Math.abs(fc) <= 1e-12 * Math.abs(level)) return c;
    if (fc < 0) {
      a = c;
      fa = fc;
      if (side === -1) fb /= 2;
      side = -1;
    } else {
      b = c;
      fb = fc;
      if (side === 1) fa /= 2;
      side = 1;
    }
  }
  return (a * fb - b * fa) / (fb - fa);
}
