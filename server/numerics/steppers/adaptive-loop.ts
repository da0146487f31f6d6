/**
 * Adaptive time loop for the engine's system: the NDF stepper (ndf.ts) on the reaction–diffusion system
 * (reaction-diffusion-system.ts), an active window of cells, and observers fed from dense output.
 */
import type { DiffusionOperator } from '../diffusion.ts';
import type { Observer, SolverResult } from '../time-loop.ts';
import { makeNdfStepper, type NdfStepper } from './ndf.ts';
import { makeReactionDiffusionSystem, type ReactionDiffusionCoefficients } from './reaction-diffusion-system.ts';
import type { AdaptiveCounters } from './stiff-system.ts';

export type { AdaptiveCounters } from './stiff-system.ts';

export interface ActiveWindowPolicy {
  /**
   * Density floor ε: cells outside the window hold u ≤ ε. The window widens whenever a cell in its outer
   * guard band exceeds ε. See {@link windowFloor} for the bound that makes skipping safe.
   */
  floor: number;
  /** Host fraction below which a cell counts as "hosts gone" (behind the front), with u ≤ ε too. */
  hostFloor: number;
  /** Cells added when the window widens (default max(32, nCells/64)). */
  chunk?: number;
}

export interface AdaptiveLoopOptions {
  /** End time [yr], > 0. */
  tEnd: number;
  /** Relative tolerance of the local error test (see DEVELOPERS.md for the default). */
  rtol: number;
  /** Absolute tolerance [relative density, host fraction]. */
  atol: number;
  /** Largest step [yr] (default tEnd/8: dense output and stop conditions stay well sampled). */
  maxStep?: number;
  /** Largest order 1…5 (default 5). */
  maxOrder?: number;
  /** Active window; null runs every cell. */
  window?: ActiveWindowPolicy | null;
  observers?: Observer[];
  /**
   * Extra times [yr] at which observers also see the state (from dense output), beyond every accepted
   * step: e.g. an output grid for front series. Sorted ascending.
   */
  outputTimes?: readonly number[];
  /** Output times every `outputEvery` years (in addition to outputTimes), default none. */
  outputEvery?: number;
  shouldCancel?: () => boolean;
  onProgress?: (fraction: number) => void;
  /** Polls cancel / progress every this many accepted steps (default 8). */
  pollEvery?: number;
  forceThomas?: boolean;
}

/** The time loop's solver report, with the adaptive counters; status 'failed' when the step size collapsed. */
export type AdaptiveResult = Omit<SolverResult, 'status'> & {
  status: SolverResult['status'] | 'failed';
  info: SolverResult['info'] & { adaptive: AdaptiveCounters };
};

/**
 * The window floor ε for a run: ε = fraction × level × exp(−Λ T).
 *
 * @remarks
 * Bound (stated, and tested in tests/numerics/adaptive-loop.test.ts): outside the window u ≤ ε. While the
 * density is small, u' ≤ L u + Λ u with Λ = max(0, largest low-density per-capita rate) (to first order in
 * u), and the window edge acts on the cells inside like a boundary value ≤ ε. By the discrete maximum
 * principle of the M-matrix semi-discretisation, ε e^{Λ t} is a supersolution of the difference between
 * the full and the windowed runs, so any density (and so any detection-level passage, crossing or
 * arrival at level `level`) differs by at most ε e^{ΛT} ≤ fraction × level over the horizon T.
 * @param level - detection level [relative density]
 * @param lowDensityRate - largest per-capita rate at low density over the layout [1/yr] (≤ 0 for Allee forms)
 * @param horizonYears - T [yr]
 * @param fraction - share of the level allowed (default 1e-6: the L1 profile difference it causes is then
 *   below the time error of the tightest tolerance in the bench, measured in tests/numerics/steppers/adaptive-loop.test.ts)
 */
export function windowFloor(level: number, lowDensityRate: number, horizonYears: number, fraction = 1e-6): number {
  return Math.max(1e-200, fraction * level * Math.exp(-Math.max(0, lowDensityRate) * horizonYears));
}

/** Initial window: cells with u > floor (or h moving), widened by one chunk each side; whole grid if none. */
function initialCells(u: Float64Array, floor: number, chunk: number): { lo: number; hi: number } {
  const n = u.length;
  let first = -1;
  let last = -1;
  for (let i = 0; i < n; i++)
    if (u[i] > floor) {
      if (first < 0) first = i;
      last = i;
    }
  if (first < 0) return { lo: 0, hi: Math.min(n, chunk) };
  return { lo: Math.max(0, first - chunk), hi: Math.min(n, last + 1 + chunk) };
}

/** Output times for observers: the list and the regular grid merged, in order. */
function outputTimes(options: AdaptiveLoopOptions, tEnd: number): number[] {
  const outs: number[] = [...(options.outputTimes ?? [])];
  if (options.outputEvery && options.outputEvery > 0) {
    const k = Math.floor(tEnd / options.outputEvery + 1e-9);
    for (let j = 1; j <= k; j++) outs.push(j * options.outputEvery);
  }
  return outs.sort((a, b) => a - b);
}

/** The active window's cells [lo, hi), its largest extent so far, and its update after a step. */
interface CellWindow {
  cells: { lo: number; hi: number };
  largest: number;
  /** Widens (ahead) or narrows (behind, hosts gone) the window from the packed state; true when it changed. */
  adjust(yy: Float64Array): boolean;
}

function makeCellWindow(policy: ActiveWindowPolicy | null, u: Float64Array, hostAtCells: ArrayLike<number | boolean>): CellWindow {
  const n = u.length;
  const chunk = policy ? Math.max(8, Math.min(n, policy.chunk ?? Math.max(32, Math.ceil(n / 64)))) : n;
  const guard = Math.max(2, chunk >> 1);
  const cells = policy ? initialCells(u, policy.floor, chunk) : { lo: 0, hi: n };
  const w: CellWindow = {
    cells,
    largest: cells.hi - cells.lo,
    adjust(yy) {
      if (!policy) return false;
      const eps = policy.floor;
      let { lo, hi } = w.cells;
      let hot = false;
      for (let i = hi - 1; i >= Math.max(lo, hi - guard); i--) if (yy[2 * i] > eps) hot = true;
      if (hot && hi < n) hi = Math.min(n, hi + chunk);
      hot = false;
      for (let i = lo; i < Math.min(hi, lo + guard); i++) if (yy[2 * i] > eps) hot = true;
      if (hot && lo > 0) lo = Math.max(0, lo - chunk);
      // Behind the front: a run of cells at the window's edge with the hosts gone and u ≤ ε leaves the window.
      // Cells without host count as gone only next to gone host cells (they cannot host growth either way).
      const gone = (i: number) => yy[2 * i] <= eps && (hostAtCells[i] ? yy[2 * i + 1] <= policy.hostFloor : true);
      let k = lo;
      while (k < hi - chunk && gone(k)) k++;
      if (k - lo >= chunk && k > 0) lo = k - guard;
      k = hi;
      while (k > lo + chunk && gone(k - 1)) k--;
      if (hi - k >= chunk && k < n) hi = k + guard;
      if (lo === w.cells.lo && hi === w.cells.hi) return false;
      w.cells = { lo, hi };
      w.largest = Math.max(w.largest, hi - lo);
      return true;
    },
  };
  return w;
}

/** The loop's result: its status and the stepper's, linear solver's and window's counters. */
function loopResult(
  status: AdaptiveResult['status'],
  message: string,
  t: number,
  stepper: NdfStepper,
  system: ReturnType<typeof makeReactionDiffusionSystem>,
  extra: { observerCalls: number; largestWindowCells: number; nCells: number; rtol: number; atol: number; started: number },
): AdaptiveResult {
  const c = stepper.counters;
  const { started, ...rest } = extra;
  return {
    status,
    message,
    t,
    info: {
      steps: c.accepted,
      rejectedSteps: c.rejected,
      diffusion: { trbdf2Steps: 0, fallbackSteps: 0, factorisations: c.factorisations },
      reaction: { substeps: 0 },
      wallMs: performance.now() - started,
      adaptive: {
        ...c,
        lockstepFactorisations: system.linearCounters.lockstep,
        thomasFactorisations: system.linearCounters.thomas,
        ...rest,
      },
    },
  };
}

/**
 * Observers fed at their output times inside each step (dense output) and at the step's end; the state
 * they see holds the window's cells (cells outside are frozen, so u and h there already hold their values).
 */
function makeObserverFeed(
  system: ReturnType<typeof makeReactionDiffusionSystem>,
  observers: NonNullable<AdaptiveLoopOptions['observers']>,
  outs: readonly number[],
  u: Float64Array,
  h: Float64Array,
  win: CellWindow,
) {
  const state: {
    t: number;
    tPrevious: number;
    u: Float64Array;
    h: Float64Array;
    densityAt?: (cell: number, t: number) => number;
    stateAt?: (t: number, u: Float64Array, h: Float64Array) => void;
  } = { t: 0, tPrevious: 0, u, h };
  const dense = new Float64Array(u.length + h.length);
  let nextOut = 0;
  const f = {
    state,
    calls: 0,
    feed(t: number, from: Float64Array): boolean {
      system.unpack(from, u, h, win.cells.lo, win.cells.hi);
      state.tPrevious = state.t;
      state.t = t;
      f.calls++;
      let stop = false;
      for (const o of observers) if (o.handle(state)) stop = true;
      return stop;
    },
    /** Feeds the output times passed in the step just taken, then its end; true when an observer stops the run. */
    afterStep(stepper: NdfStepper): boolean {
      // Every step's end is looked at, so tPrevious ≥ the step's start and the step's polynomial covers it.
      state.densityAt ??= (cell, tq) => stepper.interpolateAt(tq, 2 * cell);
      state.stateAt ??= (tq, uOut, hOut) => system.unpack(stepper.interpolate(tq, dense), uOut, hOut, win.cells.lo, win.cells.hi);
      let stop = false;
      while (!stop && nextOut < outs.length && outs[nextOut] < stepper.t - 1e-12) {
        const tq = outs[nextOut++];
        if (tq > stepper.tOld) stop = f.feed(tq, stepper.interpolate(tq, dense));
      }
      if (stop) return true;
      while (nextOut < outs.length && outs[nextOut] <= stepper.t + 1e-12) nextOut++;
      return f.feed(stepper.t, stepper.y);
    },
  };
  for (const o of observers) o.initialize?.(state);
  return f;
}

/**
 * Runs the system from (u, h) to tEnd with error control; u and h hold the final state (and, while
 * running, the state of the last observer call).
 */
export function runAdaptiveLoop(
  op: DiffusionOperator,
  coeffs: ReactionDiffusionCoefficients,
  u: Float64Array,
  h: Float64Array,
  options: AdaptiveLoopOptions,
): AdaptiveResult {
  const started = performance.now();
  const { tEnd, rtol, atol, observers = [], shouldCancel, onProgress, pollEvery = 8 } = options;
  if (!(tEnd > 0)) throw new RangeError(`tEnd must be > 0 (got ${tEnd})`);
  const n = op.n;
  const system = makeReactionDiffusionSystem(op, coeffs, { forceThomas: options.forceThomas });
  const y = system.pack(u, h);
  const win = makeCellWindow(options.window ?? null, u, coeffs.hostAtCells);
  const { lo, hi } = win.cells;
  const stepper: NdfStepper = makeNdfStepper(system, 0, y, { rtol, atol, maxStep: options.maxStep ?? tEnd / 8, maxOrder: options.maxOrder, nonNegative: true }, { lo: 2 * lo, hi: 2 * hi });
  const feed = makeObserverFeed(system, observers, outputTimes(options, tEnd), u, h, win);

  let status: AdaptiveResult['status'] = 'completed';
  let message = `reached the end time ${tEnd} yr`;
  while (stepper.t < tEnd) {
    if (!stepper.step(tEnd)) {
      status = 'failed';
      message = `step size fell below round-off at t = ${stepper.t.toPrecision(6)} yr`;
      break;
    }
    const k = stepper.counters.accepted;
    const stop = observers.length > 0 && feed.afterStep(stepper);
    if (win.adjust(stepper.y)) stepper.setWindow(2 * win.cells.lo, 2 * win.cells.hi);
    if (stop) {
      status = 'stopped';
      message = `stopped by an observer at t = ${feed.state.t.toPrecision(6)} yr`;
      break;
    }
    if (k % pollEvery === 0) {
      onProgress?.(stepper.t / tEnd);
      if (shouldCancel?.()) {
        status = 'cancelled';
        message = `cancelled at t = ${stepper.t.toPrecision(6)} yr`;
        break;
      }
    }
  }
  if (status !== 'stopped') {
    system.unpack(stepper.y, u, h, 0, n);
    feed.state.t = stepper.t;
  }
  for (const o of observers) o.finalize?.(feed.state);
  return loopResult(status, message, status === 'stopped' ? feed.state.t : stepper.t, stepper, system, {
    observerCalls: feed.calls,
    largestWindowCells: win.largest,
    nCells: n,
    rtol,
    atol,
    started,
  });
}
