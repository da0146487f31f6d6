/**
 * The baseline run (the stand as it stands) and what option analyses take from it: each clearing's baseline
 * crossing time and the snapshot window runs start from; the settings and option spec shared by the barrier
 * rooms (critical-width/, width-delay/, verdict/); option checks.
 */
import type { PointScenario } from '../../model/scenario.ts';
import { optionPlacementProblems, segmentBreaks } from '../../model/scenario.ts';
import { ScenarioError, type Problem as FieldProblem } from '../../model/errors.ts';
import type { TransectMesh } from '../../domain/transect-mesh.ts';
import { cellIndexAt } from '../../numerics/grid.ts';
import { firstPassage, type FieldState, type Observer } from '../../numerics/time-loop.ts';
import { chooseResolution, discretise, type Resolution } from '../../problem/discretise.ts';
import { type ClearingSpec } from '../../problem/layout.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { mergedResolution as mergedResolutionOf } from '../../problem/resolution.ts';
import { runLayout, summariseRun, type RunOutput } from '../run/simulate.ts';
import { ArrivalTracker } from '../run/trackers.ts';
import type { RunResult } from '../result.ts';
import { 
  CrossingWatch,
  barrierGeometry,
  crossingProbeKm,
  establishedLevels,
  movementLengthKm,
  WINDOW_LEVEL,
  type BarrierGeometry,
  type StartState } from '../run/barrier-run.ts';


/** Default tolerance of the critical-width bracket [m]. */
export const DEFAULT_TOLERANCE_M = 10;

/** A barrier option as the analysis needs it. */
export interface BarrierOptionSpec extends ClearingSpec {
  name: string;
}

export interface BarrierSettings {
  /** Keep profiles and space–time maps in run summaries (default true; ensembles switch it off). */
  record?: boolean;
  /** A baseline computed by {@link analyseBaseline} for this scenario (saves one run per option). */
  baseline?: BaselineAnalysis;
  /** Compute the critical width by bisection (default true). */
  criticalWidth?: boolean;
  /** Compute the width–delay curve (default true). */
  widthCurve?: boolean;
  /** Bracket tolerance [m] (default: the scenario's, else 10 m). */
  toleranceM?: number;
  /** Seed the bisection with the phase-plane value (default true; ensemble draws switch it off to save its cost). */
  phasePlane?: boolean;
  /** Repeat the bracket ends with half the step and on a doubled window (default true; ensemble draws switch it off). */
  bracketChecks?: boolean;
  /** Widths of the width–delay curve [m] (default: the scenario's, else automatic). */
  curveWidthsM?: number[];
  /** Years a run may go past the horizon to verify pinning or project a crossing (default 3 × horizon). */
  extensionYears?: number;
  shouldCancel?: () => boolean;
  onProgress?: (fraction: number, stage: string) => void;
}


/**
 * Checks an option against the scenario (the same rules the scenario schema applies, for callers that
 * build options in code).
 * @throws ScenarioError naming the field, the value and the allowed range
 */
export function checkOption(s: PointScenario, o: BarrierOptionSpec, path = 'barrier.options[?]'): void {
  const breaks = segmentBreaks(s.transect);
  const problems: FieldProblem[] =
    !(o.widthM > 0) || !Number.isFinite(o.widthM)
      ? [{ path: `${path}.widthM`, value: o.widthM, message: 'must be > 0 m' }]
      : optionPlacementProblems(o, path, [breaks[0], breaks[breaks.length - 1]], s.infestation);
  if (problems.length) throw new ScenarioError(problems);
}


/** Baseline facts one option needs: when the front passed the clearing's far edge, and a state to start window runs from. */
export interface BaselineCrossing {
  crossedYears: number | null;
  /** Baseline state when the front came within {@link snapshotDistanceKm} of the clearing (null if it never did). */
  snapshot: StartState | null;
}

export interface BaselineAnalysis {
  out: RunOutput;
  summary: RunResult;
  /** Per option key ({@link optionKey}). */
  crossings: Map<string, BaselineCrossing>;
}

export function optionKey(o: ClearingSpec): string {
  return `${o.fromKm}|${o.widthM}|${o.cover}`;
}

/** How far ahead of the clearing the front is when window runs start [km]. */
export function snapshotDistanceKm(s: PointScenario): number {
  return 3 * movementLengthKm(s);
}

/** How far behind the clearing (or the front) the windows of the width–delay runs and the run past the horizon reach [km]. */
export function windowBehindKm(s: PointScenario): number {
  return snapshotDistanceKm(s) + 10 * movementLengthKm(s);
}

/** Records the baseline crossing time and the start snapshot for one clearing. */
class BaselineWatch implements Observer {
  readonly crossing: CrossingWatch;
  snapshot: StartState | null = null;
  private readonly triggerCell: number;
  private readonly immediate: boolean;
  constructor(
    s: PointScenario,
    private readonly mesh: TransectMesh,
    levels: Float64Array,
    geometry: BarrierGeometry,
  ) {
    const grid = mesh.grid;
    this.crossing = new CrossingWatch(grid, geometry, levels, false, crossingProbeKm(s), s.detectionLevel);
    const x = geometry.nearKm - geometry.direction * snapshotDistanceKm(s);
    const infEdge = geometry.direction > 0 ? s.infestation.toKm : s.infestation.fromKm;
    this.immediate = geometry.direction * (x - infEdge) <= 0;
    this.triggerCell = cellIndexAt(grid, x);
  }
  private take(st: FieldState): void {
    this.snapshot = { mesh: this.mesh, u: Float64Array.from(st.u), h: Float64Array.from(st.h), t: st.t };
  }
  initialize(st: FieldState): void {
    this.crossing.initialize(st);
    if (this.immediate || st.u[this.triggerCell] >= WINDOW_LEVEL) this.take(st);
  }
  handle(st: FieldState): void {
    this.crossing.handle(st);
    if (this.snapshot || !(st.u[this.triggerCell] >= WINDOW_LEVEL)) return;
    const at = st.densityAt;
    const v0 = at && st.stateAt && st.t > st.tPrevious ? at(this.triggerCell, st.tPrevious) : NaN;
    if (!(v0 < WINDOW_LEVEL)) {
      this.take(st);
      return;
    }
    // The state when the level passed the trigger cell, from the dense output (not the step's end).
    const tp = firstPassage((tq) => at!(this.triggerCell, tq), st.tPrevious, v0, st.t, st.u[this.triggerCell], WINDOW_LEVEL);
    const u = Float64Array.from(st.u);
    const h = Float64Array.from(st.h);
    st.stateAt!(tp, u, h);
    // The interpolant may dip a round-off below 0 between step ends; densities and hosts cannot.
    for (let i = 0; i < u.length; i++) {
      if (u[i] < 0) u[i] = 0;
      if (h[i] < 0) h[i] = 0;
    }
    this.snapshot = { mesh: this.mesh, u, h, t: tp };
  }
}

/**
 * The baseline run (the stand as it stands), watching each given clearing for the crossing time and the
 * start snapshot used by window runs.
 */
export function analyseBaseline(sp: PointScenario | Problem, options: ClearingSpec[], settings: Pick<BarrierSettings, 'record' | 'shouldCancel' | 'onProgress'> = {}): BaselineAnalysis {
  const p = asProblem(sp);
  const s = p.scenario;
  const pieces = layoutOf(p);
  // Resolve with the option layouts too, so baseline and option runs share cells and step where possible.
  const resolution = options.length ? mergedResolutionOf(p, options) : chooseResolution(p, pieces);
  const problem = discretise(p, pieces, resolution);
  const levels = establishedLevels(s, problem);
  const watches = options.map((o) => new BaselineWatch(s, problem.mesh, levels, barrierGeometry(s, o)));
  const record = settings.record ?? true;
  // Without recorded profiles nothing after the last event matters: stop once every site is reached and
  // every clearing's far edge is passed (the summary then covers the run up to that year).
  const arrived = new ArrivalTracker(problem.grid, s.sites.map((x) => x.atKm), s.detectionLevel);
  const stopper: Observer = {
    initialize: (st) => arrived.initialize(st),
    handle: (st) => {
      arrived.handle(st);
      return !record && arrived.allArrived() && watches.every((w) => w.snapshot !== null && w.crossing.crossedYears !== null);
    },
  };
  const out = runLayout({
    scenario: p,
    pieces,
    resolution,
    problem,
    record,
    observers: [...watches, stopper],
    // Unrecorded runs only date events (the dense output does that inside each step): no sampling in time.
    regularOutputs: record,
    shouldCancel: settings.shouldCancel,
    onProgress: (f) => settings.onProgress?.(f, 'baseline'),
  });
  const crossings = new Map<string, BaselineCrossing>();
  options.forEach((o, k) => crossings.set(optionKey(o), { crossedYears: watches[k].crossing.crossedYears, snapshot: watches[k].snapshot }));
  return { out, summary: summariseRun(out, p), crossings };
}

/** Cell size and step that suit the baseline and every option layout (the finest of their automatic choices). */
export function mergedResolution(s: PointScenario | Problem, options: ClearingSpec[]): Resolution {
  return mergedResolutionOf(asProblem(s), options);
}
