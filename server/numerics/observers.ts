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
  /** Values at the end of a step ending at t (the step began at the previous call's time). */
  update(t: number, values: (k: number) => number): void {
    for (let k = 0; k < this.last.length; k++) {
      const now = values(k);
      if (this.times[k] === null && now >= this.level) this.times[k] = interpolateCrossing(this.lastT, this.last[k], t, now, this.level);
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
