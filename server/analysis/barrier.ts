/**
 * Barrier analysis: does a host-free clearing hold the front, only delay it, or speed it up; how wide
 * must it be; what it costs. Entry points (plain functions, also used per parameter draw by the
 * uncertainty analysis): {@link analyseBaseline}, {@link analyseOption}, {@link criticalWidth}.
 */
import type { PointScenario } from '../model/scenario.ts';
import { optionPlacementProblems, segmentBreaks } from '../model/scenario.ts';
import { ScenarioError, type Problem } from '../model/errors.ts';
import { habitatCoefficients } from '../model/habitat.ts';
import { equilibria } from '../model/growth.ts';
import type { Grid } from '../numerics/grid.ts';
import { cellIndexAt } from '../numerics/grid.ts';
import { Schedule, type FieldState, type Observer } from '../numerics/time-loop.ts';
import { criticalGapWidth } from '../numerics/steady-blocking.ts';
import { chooseResolution, discretise, growthRateScale, type Resolution } from './discretise.ts';
import { buildLayout, stemsRemoved, type ClearingSpec } from './layout.ts';
import { makeEngineStepper, runLayout, summariseRun, type RunOutput } from './simulate.ts';
import { ArrivalTracker } from './trackers.ts';
import { spreadRate } from './speed.ts';
import type { CriticalWidth, OptionResult, RunResult, SiteVerdict, VerdictKind, WidthDelayRow } from './result.ts';
import { frontCannotAdvance, potential, potentialThreshold, smallGroupsFail, strongAllee } from './barrier-growth.ts';
import {
  ApproachWatch,
  CrossingWatch,
  PINNING_METHODS,
  PinningJudge,
  barrierGeometry,
  crossingProbeKm,
  establishedLevels,
  isBeyond,
  makeWindowSolver,
  movementLengthKm,
  pinningMode,
  runWindow,
  WINDOW_LEVEL,
  windowAheadKm,
  type BarrierGeometry,
  type Judgement,
  type StartState,
  type WindowOutcome,
} from './barrier-run.ts';

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

// ---------------------------------------------------------------------------------------------------
// Validation

/**
 * Checks an option against the scenario (the same rules the scenario schema applies, for callers that
 * build options in code).
 * @throws ScenarioError naming the field, the value and the allowed range
 */
export function checkOption(s: PointScenario, o: BarrierOptionSpec, path = 'barrier.options[?]'): void {
  const breaks = segmentBreaks(s.transect);
  const problems: Problem[] =
    !(o.widthM > 0) || !Number.isFinite(o.widthM)
      ? [{ path: `${path}.widthM`, value: o.widthM, message: 'must be > 0 m' }]
      : optionPlacementProblems(o, path, [breaks[0], breaks[breaks.length - 1]], s.infestation);
  if (problems.length) throw new ScenarioError(problems);
}

// ---------------------------------------------------------------------------------------------------
// Baseline

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
function windowBehindKm(s: PointScenario): number {
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
    private readonly grid: Grid,
    levels: Float64Array,
    geometry: BarrierGeometry,
  ) {
    this.crossing = new CrossingWatch(grid, geometry, levels, false, crossingProbeKm(s), s.detectionLevel);
    const x = geometry.nearKm - geometry.direction * snapshotDistanceKm(s);
    const infEdge = geometry.direction > 0 ? s.infestation.toKm : s.infestation.fromKm;
    this.immediate = geometry.direction * (x - infEdge) <= 0;
    this.triggerCell = cellIndexAt(grid, x);
  }
  private take(st: FieldState): void {
    this.snapshot = { grid: this.grid, u: Float64Array.from(st.u), h: Float64Array.from(st.h), t: st.t };
  }
  initialize(st: FieldState): void {
    this.crossing.initialize(st);
    if (this.immediate || st.u[this.triggerCell] >= WINDOW_LEVEL) this.take(st);
  }
  handle(st: FieldState): void {
    this.crossing.handle(st);
    if (!this.snapshot && st.u[this.triggerCell] >= WINDOW_LEVEL) this.take(st);
  }
}

/**
 * The baseline run (the stand as it stands), watching each given clearing for the crossing time and the
 * start snapshot used by window runs.
 */
export function analyseBaseline(s: PointScenario, options: ClearingSpec[], settings: Pick<BarrierSettings, 'record' | 'shouldCancel' | 'onProgress'> = {}): BaselineAnalysis {
  const pieces = buildLayout(s);
  const res = chooseResolution(s, pieces);
  // Resolve with the option layouts too, so baseline and option runs share cells and step where possible.
  const resolution = options.length ? mergedResolution(s, options) : res;
  const problem = discretise(s, pieces, resolution);
  const levels = establishedLevels(s, problem);
  const watches = options.map((o) => new BaselineWatch(s, problem.grid, levels, barrierGeometry(s, o)));
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
    scenario: s,
    pieces,
    resolution,
    problem,
    record,
    observers: [...watches, stopper],
    shouldCancel: settings.shouldCancel,
    onProgress: (f) => settings.onProgress?.(f, 'baseline'),
  });
  const crossings = new Map<string, BaselineCrossing>();
  options.forEach((o, k) => crossings.set(optionKey(o), { crossedYears: watches[k].crossing.crossedYears, snapshot: watches[k].snapshot }));
  return { out, summary: summariseRun(out, s), crossings };
}

/** Cell size and step that suit the baseline and every option layout (the finest of their automatic choices). */
export function mergedResolution(s: PointScenario, options: ClearingSpec[]): Resolution {
  let r = chooseResolution(s, buildLayout(s));
  for (const o of options) {
    const q = chooseResolution(s, buildLayout(s, o));
    r = { ...r, cellKm: Math.min(r.cellKm, q.cellKm), stepYears: Math.min(r.stepYears, q.stepYears) };
  }
  return r;
}

// ---------------------------------------------------------------------------------------------------
// Critical width

/** One full-model run of the bisection. */
export interface WidthRun {
  widthM: number;
  outcome: 'crossed' | 'pinned' | 'open';
  crossedYears: number | null;
  /** Years simulated in the run. */
  years: number;
  stepYears: number;
  method: string | null;
}

export interface CriticalWidthOutcome extends CriticalWidth {
  /** Every run of the bisection, in order. */
  history: WidthRun[];
  /** Runs repeated with the step halved at the bracket's lower end (a crossing there could be a time-step artefact). */
  halfStepCheck: { widthM: number; outcome: string } | null;
  /** Bracket ends repeated on a window twice as large: the same outcome means the window does not change the answer. */
  windowCheck: { widthsM: number[]; agreed: boolean } | null;
  /** Computational window used [km from the near edge, behind and ahead]. */
  windowKm: { behind: number; ahead: number } | null;
  /**
   * Outcome of the window run without any clearing, when the baseline did not pass the clearing within the
   * horizon (null when not run): 'pinned' = held before this point anyway, 'open' = did not get there.
   */
  withoutClearing?: WidthRun['outcome'] | null;
}

interface WidthProbeContext {
  s: PointScenario;
  option: ClearingSpec;
  geometry: BarrierGeometry;
  snapshot: StartState;
  resolution: Resolution;
  budgetYears: number;
  behindKm: number;
  aheadKm: number;
  shouldCancel?: () => boolean;
}

/** The clearing of the given width with the same near edge as the option. */
function clearingOfWidth(c: WidthProbeContext, widthM: number): ClearingSpec {
  const fromKm = c.geometry.direction > 0 ? c.geometry.nearKm : c.geometry.nearKm - widthM / 1000;
  return { fromKm, widthM, cover: c.option.cover };
}

/** Largest width whose clearing still leaves host forest beyond it inside the transect [m]. */
function maxUsableWidthM(s: PointScenario, g: BarrierGeometry): number {
  const pieces = buildLayout(s);
  let lastHost = g.nearKm;
  for (const p of pieces) {
    if (p.habitat !== 'host-forest' || !(p.stocking > 0)) continue;
    if (g.direction > 0 && p.toKm > g.nearKm) lastHost = Math.max(lastHost, p.toKm);
    if (g.direction < 0 && p.fromKm < g.nearKm) lastHost = Math.min(lastHost, p.fromKm);
  }
  // Keep at least two movement lengths of forest beyond the widest clearing.
  return Math.max(0, (Math.abs(lastHost - g.nearKm) - 2 * movementLengthKm(s)) * 1000);
}

/**
 * Runs one width in the window from the snapshot until crossing, verified pinning, or the budget. Width 0
 * is the stand as it stands (no clearing), watched at the option's near edge.
 */
function classifyWidth(c: WidthProbeContext, widthM: number, stepFactor = 1, windowFactor = 1): WidthRun {
  const clearing = widthM > 0 ? clearingOfWidth(c, widthM) : null;
  const g: BarrierGeometry = clearing ? barrierGeometry(c.s, clearing) : { ...c.geometry, farKm: c.geometry.nearKm };
  const pieces = clearing ? buildLayout(c.s, clearing) : buildLayout(c.s);
  const d = g.direction;
  const behind = c.behindKm * windowFactor;
  const ahead = c.aheadKm * windowFactor;
  const ends = [g.nearKm - d * behind, g.farKm + d * ahead];
  const resolution = { ...c.resolution, stepYears: c.resolution.stepYears * stepFactor };
  const solver = makeWindowSolver(c.s, pieces, [Math.min(...ends), Math.max(...ends)], resolution, c.budgetYears);
  const r = runWindow(solver, {
    start: c.snapshot,
    tEnd: c.snapshot.t + c.budgetYears,
    geometry: g,
    stopOnCross: true,
    judge: true,
    shouldCancel: c.shouldCancel,
  });
  return {
    widthM,
    outcome: r.outcome,
    crossedYears: r.crossedYears,
    years: r.endYears - c.snapshot.t,
    stepYears: resolution.stepYears,
    method: r.judgement?.method ?? null,
  };
}

/** Phase-plane (first-integral) critical width for the option's site [m], or null with the reason. */
export function phasePlaneWidth(s: PointScenario, option: ClearingSpec): { widthM: number | null; note: string; assumesIntactHosts?: boolean } {
  const g = barrierGeometry(s, option);
  const pieces = buildLayout(s);
  const at = (x: number) => pieces.find((p) => p.fromKm <= x && x < p.toKm) ?? pieces[pieces.length - 1];
  const before = at(g.nearKm - g.direction * 1e-6);
  const after = at(g.farKm + g.direction * 1e-6);
  if (before.habitat !== 'host-forest' || after.habitat !== 'host-forest' || !(before.stocking > 0) || !(after.stocking > 0)) {
    return { widthM: null, note: 'the phase-plane criterion needs host forest on both sides of the clearing' };
  }
  const gr = s.pest.growth;
  if (!strongAllee(gr, after.stocking) || !strongAllee(gr, before.stocking)) {
    const why = smallGroupsFail(gr, after.stocking)
      ? 'the pest has an Allee threshold but no carrying capacity (no crowding), so there is no steady front for the phase-plane criterion'
      : 'no strong Allee effect: the phase-plane blocking criterion does not apply';
    return { widthM: null, note: why };
  }
  const host = habitatCoefficients(s.pest, 'host-forest');
  const gap = habitatCoefficients(s.pest, option.cover);
  const thetaR = potentialThreshold(gr, after.stocking)!;
  const r = criticalGapWidth({
    diffusionForest: host.diffusion,
    potentialLeft: potential(gr, before.stocking),
    capacityLeft: equilibria(gr, before.stocking).capacity!,
    potentialRight: potential(gr, after.stocking),
    thetaRight: Number.isFinite(thetaR) ? thetaR : 10 * (equilibria(gr, after.stocking).capacity ?? 1),
    diffusionGap: gap.diffusion,
    mortalityGap: gap.mortality,
    jump: gap.residence / host.residence,
  });
  const depletion = s.pest.hostKillRate > 0 ? ' Hosts are held at their present stocking in this criterion (it ignores host depletion).' : '';
  return { widthM: r.criticalKm === null ? null : r.criticalKm * 1000, note: `${r.note}.${depletion}`, assumesIntactHosts: s.pest.hostKillRate > 0 };
}

/** The baseline crossing and snapshot for one option, from a given baseline or a fresh (unrecorded) run. */
function baselineFor(s: PointScenario, option: ClearingSpec, settings: BarrierSettings): BaselineCrossing {
  const known = settings.baseline?.crossings.get(optionKey(option));
  if (known) return known;
  return analyseBaseline(s, [option], { record: false, shouldCancel: settings.shouldCancel }).crossings.get(optionKey(option))!;
}

/**
 * Critical width for containment: the smallest width that pins the front, bracketed [crossed, pinned]
 * to the tolerance by bisection on full-model runs in a window around the clearing, started from the
 * baseline state as the front approaches. Pinned means verified (see PinningJudge); a run that only
 * lingers counts as not pinned. The lower end is repeated with the step halved, and both ends on a
 * window twice as large. For growth without a strong Allee effect no width pins a front.
 */
export function criticalWidth(s: PointScenario, option: BarrierOptionSpec | ClearingSpec, settings: BarrierSettings = {}): CriticalWidthOutcome {
  checkOption(s, { name: 'option', ...option });
  const toleranceM = settings.toleranceM ?? s.barrier?.toleranceM ?? DEFAULT_TOLERANCE_M;
  const geometry = barrierGeometry(s, option);
  const pp: ReturnType<typeof phasePlaneWidth> =
    settings.phasePlane === false ? { widthM: null, note: 'phase-plane value not computed (switched off)' } : phasePlaneWidth(s, option);
  const base: CriticalWidthOutcome = {
    applicable: false,
    note: '',
    bracketM: null,
    toleranceM,
    runs: 0,
    phasePlaneM: pp.widthM,
    phasePlaneNote: pp.note,
    phasePlaneAssumesIntactHosts: pp.assumesIntactHosts ?? false,
    marginal: false,
    delayPer100mYears: null,
    history: [],
    halfStepCheck: null,
    windowCheck: null,
    windowKm: null,
  };
  const pieces = buildLayout(s);
  // Host forest with some stretch beyond the clearing (its far end lies beyond, whatever its midpoint).
  const beyond = pieces.filter((p) => p.habitat === 'host-forest' && p.stocking > 0 && isBeyond(geometry, geometry.direction > 0 ? p.toKm : p.fromKm));
  const hBeyond = Math.max(0, ...beyond.map((p) => p.stocking));
  if (pinningMode(s, hBeyond) === 'none') {
    return {
      ...base,
      note: 'No finite clearing pins a front in this model: without a strong Allee effect in the forest beyond, any insects that cross found a growing population. A clearing can only change when the pest arrives (see the delay per 100 m of width; negative means it arrives sooner).',
    };
  }
  if (settings.criticalWidth === false) return { ...base, applicable: true, note: 'critical width not computed (switched off)' };
  const crossing = baselineFor(s, option, settings);
  if (!crossing.snapshot) {
    return {
      ...base,
      applicable: true,
      note: 'The front does not come near the clearing within the horizon in the baseline run, so the bisection has no arriving front to test; see the phase-plane value.',
    };
  }
  const resolution = mergedResolution(s, [option]);
  const ell = movementLengthKm(s);
  const c: WidthProbeContext = {
    s,
    option,
    geometry,
    snapshot: crossing.snapshot,
    resolution,
    budgetYears: Math.max(s.horizonYears, 150 / growthRateScale(s.pest.growth)),
    behindKm: snapshotDistanceKm(s) + 8 * ell,
    // Beyond the fringe's reach as much again: a reflecting cut too close behind the fringe lets density pile up.
    aheadKm: windowAheadKm(s),
    shouldCancel: settings.shouldCancel,
  };
  const maxW = maxUsableWidthM(s, geometry);
  const history: WidthRun[] = [];
  const classify = (w: number, stepFactor = 1, windowFactor = 1) => {
    const r = classifyWidth(c, w, stepFactor, windowFactor);
    history.push(r);
    settings.onProgress?.(Math.min(0.95, history.length / 14), `critical width (${Math.round(w)} m)`);
    return r;
  };
  let lo = 0; // widest seen to let the front through (0 = the baseline)
  let hi: number | null = null; // narrowest verified to pin
  const record = (r: WidthRun) => {
    if (r.outcome === 'pinned') hi = hi === null ? r.widthM : Math.min(hi, r.widthM);
    else lo = Math.max(lo, r.widthM);
  };
  // The bisection takes width 0 (the stand as it stands) to let the front through. When the baseline did
  // not pass this point within the horizon, that is run first: a front already held before the clearing
  // (by the existing layout) needs no clearing, and one that never gets there gives nothing to bracket.
  if (crossing.crossedYears === null) {
    const r0 = classify(0);
    if (r0.outcome !== 'crossed') {
      const held = r0.outcome === 'pinned';
      return {
        ...base,
        applicable: true,
        bracketM: held ? [0, 0] : null,
        runs: history.length,
        history,
        withoutClearing: r0.outcome,
        windowKm: { behind: c.behindKm, ahead: c.aheadKm },
        note: held
          ? `Even without a clearing the front is held before this point (verified: ${PINNING_METHODS[pinningMode(s, hBeyond)]}): no clearing is needed here under this model.`
          : `Without any clearing the front did not get past this point within ${Math.round(c.budgetYears)} years of the window run either (it stalls or dies out before it), so there is no critical width to find.`,
      };
    }
  }
  // Seed: the phase-plane value (−10 %, +15 %) when known, else the option's width; then double until pinned.
  const seeds = pp.widthM !== null && pp.widthM > 0 ? [0.9 * pp.widthM, 1.15 * pp.widthM] : [option.widthM];
  for (const w of seeds) if (w < maxW) record(classify(w));
  let w = Math.max(lo, option.widthM);
  while (hi === null) {
    w = Math.max(2 * w, 2 * toleranceM);
    if (w > maxW) break;
    record(classify(w));
  }
  if (hi === null) {
    return {
      ...base,
      applicable: true,
      runs: history.length,
      history,
      note: `No width up to ${Math.round(lo)} m was verified to pin the front (the transect leaves no room for wider clearings, or runs ended undecided).`,
      windowKm: { behind: c.behindKm, ahead: c.aheadKm },
    };
  }
  const bisect = (stepFactor: number) => {
    while (hi! - lo > toleranceM) {
      const mid = 0.5 * (lo + hi!);
      record(classify(mid, stepFactor));
    }
  };
  bisect(1);
  // A crossing at the lower end could be an artefact of the time step (splitting shifts the discrete
  // threshold by O(dt²)): repeat it with half the step; if it then pins, continue at the finer step.
  let halfStepCheck: CriticalWidthOutcome['halfStepCheck'] = null;
  let stepFactor = 1;
  if (lo > 0 && settings.bracketChecks !== false) {
    const r = classify(lo, 0.5);
    halfStepCheck = { widthM: lo, outcome: r.outcome };
    if (r.outcome === 'pinned') {
      stepFactor = 0.5;
      hi = lo;
      lo = Math.max(0, ...history.filter((x) => x.outcome !== 'pinned' && x.widthM < lo).map((x) => x.widthM));
      bisect(stepFactor);
    }
  }
  // The same two widths on a window twice as large.
  const ends = [lo, hi].filter((x) => x > 0);
  const again = settings.bracketChecks === false ? null : ends.map((x) => classify(x, stepFactor, 2));
  const windowCheck = again && {
    widthsM: ends,
    agreed: again.every((r, k) => (r.outcome === 'pinned') === (ends[k] === hi)),
  };
  const undecided = history.filter((r) => r.outcome === 'open').length;
  return {
    ...base,
    applicable: true,
    bracketM: [lo, hi],
    runs: history.length,
    history,
    halfStepCheck,
    windowCheck,
    windowKm: { behind: c.behindKm, ahead: c.aheadKm },
    note:
      `Bisection on full-model runs (window ${c.behindKm.toFixed(1)} km behind and ${c.aheadKm.toFixed(1)} km beyond the clearing, started from the baseline as the front approached): ` +
      `${history.length} runs; pinned means verified (${PINNING_METHODS[pinningMode(s, hBeyond)]}).` +
      (undecided ? ` ${undecided} run(s) ended undecided and were counted as not pinned.` : '') +
      (windowCheck === null
        ? ' Bracket checks (half step, doubled window) switched off.'
        : windowCheck.agreed
          ? ' A window twice as large gives the same outcome at both ends.'
          : ' WARNING: a window twice as large changed an outcome; treat the bracket with caution.'),
  };
}

// ---------------------------------------------------------------------------------------------------
// Option analysis

/** Full result of one option, with internals the caller may want (the result document takes OptionResult). */
export interface OptionAnalysis {
  result: OptionResult;
  critical: CriticalWidthOutcome;
}

/** Why a clearing helps or hurts, in words (movement ratio, edge preference, mortality, growth form). */
export function reasonInWords(s: PointScenario, cover: ClearingSpec['cover'], kind: VerdictKind): string {
  const p = s.pest;
  const host = habitatCoefficients(p, 'host-forest');
  const open = habitatCoefficients(p, cover);
  const ratio = open.diffusion / host.diffusion;
  const alpha = cover === 'clearing' ? p.edgePreferenceOpen : (p.edgePreferenceNonHost ?? 0.5);
  const ground = cover === 'clearing' ? 'the open' : 'non-host forest';
  const moveWords =
    ratio > 1.05 ? `insects move ${fmt(ratio)}× faster in ${ground} than in host forest` : ratio < 0.95 ? `insects move ${fmt(1 / ratio)}× slower in ${ground} than in host forest` : `insects move as fast in ${ground} as in host forest`;
  const edgeWords =
    alpha > 0.55
      ? `at an edge they turn back into host forest with probability ${fmt(alpha)} (edge avoidance)`
      : alpha < 0.45
        ? `at an edge they step into ${ground} with probability ${fmt(1 - alpha)} (they are drawn out of the forest)`
        : `they do not avoid the edge (edge preference ${fmt(alpha)})`;
  const jump = open.residence / host.residence;
  const mort = `mortality in ${ground} is ${fmt(open.mortality)} /yr`;
  const allee = smallGroupsFail(p.growth, 1);
  const growthWords = allee
    ? 'the pest has a strong Allee effect: the few insects that get across are too sparse to breed unless enough of them arrive together'
    : 'the pest has no Allee effect: even a few insects that get across found a growing population';
  const jumpWords = Math.abs(jump - 1) < 1e-6 ? 'so the density is continuous across the edge' : `so the density just inside the cut is ${fmt(jump)} times that at the forest edge`;
  const core = `${moveWords}; ${edgeWords}, ${jumpWords}; ${mort}; ${growthWords}.`;
  switch (kind) {
    case 'speeds-up':
      return `Faster, not slower: ${core} Insects cross the cut quickly and little of the flow is lost there, so the stand beyond is reached sooner than through unbroken forest.`;
    case 'holds':
    case 'marginal':
      return `Held: ${core}`;
    case 'delays':
    case 'not-crossed':
      return `Slowed: ${core}`;
    default:
      return core;
  }
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return '—';
  return Number(x.toPrecision(x >= 10 ? 3 : 2)).toString();
}

/** Smallest arrival difference that counts as a change [yr]: one time step or 0.05 yr. */
function changeThreshold(stepYears: number): number {
  return Math.max(stepYears, 0.05);
}

/** Width–delay curve: runs from the baseline snapshot on the stretch from behind the clearing to the transect end. */
function widthDelayCurve(
  s: PointScenario,
  option: ClearingSpec,
  crossing: BaselineCrossing,
  baselineArrivals: (number | null)[],
  widthsM: number[],
  resolution: Resolution,
  shouldCancel?: () => boolean,
): WidthDelayRow[] {
  if (!crossing.snapshot) return [];
  const geometry = barrierGeometry(s, option);
  const breaks = segmentBreaks(s.transect);
  const behind = windowBehindKm(s);
  const beyondSites = s.sites.map((site) => isBeyond(geometry, site.atKm));
  const rows: WidthDelayRow[] = [];
  for (const widthM of widthsM) {
    const fromKm = geometry.direction > 0 ? geometry.nearKm : geometry.nearKm - widthM / 1000;
    const clearing: ClearingSpec = { fromKm, widthM, cover: option.cover };
    if (fromKm < breaks[0] - 1e-9 || fromKm + widthM / 1000 > breaks[breaks.length - 1] + 1e-9) continue;
    const g = barrierGeometry(s, clearing);
    // The stretch ahead only needs to reach the farthest site beyond the clearing (plus a few movement lengths).
    const beyondKm = s.sites.filter((_, k) => beyondSites[k]).map((x) => x.atKm);
    // (and at least as far as the critical-width windows: a reflecting cut close behind the fringe moves the pinning threshold).
    const margin = 5 * movementLengthKm(s);
    const ahead = windowAheadKm(s);
    const window: [number, number] =
      g.direction > 0
        ? [g.nearKm - behind, beyondKm.length ? Math.max(Math.max(...beyondKm) + margin, g.farKm + ahead) : breaks[breaks.length - 1]]
        : [beyondKm.length ? Math.min(Math.min(...beyondKm) - margin, g.farKm - ahead) : breaks[0], g.nearKm + behind];
    const solver = makeWindowSolver(s, buildLayout(s, clearing), window, resolution, s.horizonYears);
    const sitesKm = s.sites.map((x) => x.atKm);
    const r = runWindow(solver, {
      start: crossing.snapshot,
      tEnd: s.horizonYears,
      geometry: g,
      stopOnCross: false,
      judge: true,
      sitesKm,
      stopOnArrivals: true,
      shouldCancel,
    });
    rows.push({
      widthM,
      pinned: r.outcome === 'pinned',
      crossingYears: r.crossedYears,
      delayYearsBySite: s.sites.map((site, k) => {
        // Behind a verified pinned front no breeding population arrives (the delay is unbounded); a site in
        // the fringe may still see the detection level, which is not an arrival of the pest.
        if (!beyondSites[k] || !isBeyond(g, site.atKm) || r.outcome === 'pinned') return null;
        const a = r.arrivals[k];
        const b = baselineArrivals[k];
        return a !== null && b !== null ? a - b : null;
      }),
    });
  }
  return rows;
}

/** Default widths of the curve: five evenly spaced up to max(2 × option, 1.5 × upper bracket end). */
function autoCurveWidths(optionWidthM: number, bracket: [number, number] | null): number[] {
  const top = Math.max(2 * optionWidthM, bracket ? 1.5 * bracket[1] : 0);
  return Array.from({ length: 5 }, (_, k) => Math.round((top * (k + 1)) / 5));
}

/** Least-squares slope through the origin of delay against width, ×100 [yr per 100 m]. */
function delayPer100m(rows: WidthDelayRow[], siteIndex: number): number | null {
  let sxx = 0;
  let sxy = 0;
  let n = 0;
  for (const r of rows) {
    const d = r.delayYearsBySite[siteIndex];
    if (d === null || d === undefined) continue;
    sxx += r.widthM * r.widthM;
    sxy += r.widthM * d;
    n++;
  }
  return n >= 2 && sxx > 0 ? (100 * sxy) / sxx : null;
}

/**
 * Everything about one barrier option: baseline and option runs, verified pinning or the crossing
 * (projected past the horizon where the run can be extended), verdict per protected site, critical
 * width, width–delay curve, speeds, trees removed and cost.
 *
 * @param s - a point scenario (every distribution resolved)
 * @param option - the clearing (position, width, cover) and its name
 * @throws ScenarioError when the option lies outside the transect, has width ≤ 0 or overlaps the infestation
 */
export function analyseOption(s: PointScenario, option: BarrierOptionSpec, settings: BarrierSettings = {}): OptionAnalysis {
  checkOption(s, option);
  const record = settings.record ?? true;
  const geometry = barrierGeometry(s, option);
  const baseline = settings.baseline?.crossings.has(optionKey(option)) ? settings.baseline : analyseBaseline(s, [option], { record, shouldCancel: settings.shouldCancel });
  const crossing = baseline.crossings.get(optionKey(option))!;
  const resolution = mergedResolution(s, [option]);
  const pieces = buildLayout(s, option);
  const problem = discretise(s, pieces, resolution);
  const levels = establishedLevels(s, problem);
  const watch = new CrossingWatch(problem.grid, geometry, levels, false, crossingProbeKm(s), s.detectionLevel);
  // Without recorded profiles the run stops as soon as pinning is verified on the whole transect (nothing
  // changes after that); with profiles it runs to the horizon so that charts cover it.
  let earlyJudgement: Judgement | null = null;
  // Whether the pest reaches the clearing in this run (a die-out past the horizon only counts as held if it did).
  const approach = new ApproachWatch(s, problem, geometry);
  const observers: Observer[] = [watch, approach];
  if (!record) {
    const p = problem;
    const { op, stepper } = makeEngineStepper(p);
    const judgeSolver = {
      scenario: s,
      problem: p,
      op,
      stepper,
      windowKm: [p.grid.facesKm[0], p.grid.facesKm[p.grid.nCells]] as [number, number],
      establishedAtCells: levels,
    };
    const judge = new PinningJudge(judgeSolver, geometry);
    const every = Math.max(1, Math.round(Math.max(0.5, 2 / growthRateScale(s.pest.growth)) / resolution.stepYears));
    const checks = Schedule.periodic(every * resolution.stepYears);
    const arrived = new ArrivalTracker(p.grid, s.sites.map((x) => x.atKm), s.detectionLevel);
    observers.push({
      initialize: (st) => arrived.initialize(st),
      handle: (st) => {
        arrived.handle(st);
        if (watch.crossedYears !== null) return arrived.allArrived();
        judge.note(st.u);
        if (!checks.due(st.t)) return false;
        earlyJudgement = judge.check(st.t, st.u, st.h);
        return earlyJudgement !== null;
      },
    });
  }
  const out = runLayout({
    scenario: s,
    pieces,
    resolution,
    problem,
    record,
    observers,
    shouldCancel: settings.shouldCancel,
    onProgress: (f) => settings.onProgress?.(0.3 * f, `option ${option.name}`),
  });
  const run = summariseRun(out, s);
  const baseArr = baseline.summary.arrivals.map((a) => a.arrivalYears);
  const optArr = run.arrivals.map((a) => a.arrivalYears);
  const beyondSites = s.sites.map((site) => isBeyond(geometry, site.atKm));

  // Past the horizon: verify pinning, or project the crossing and the arrivals that did not happen in time.
  let judgement: Judgement | null = earlyJudgement;
  let projected: WindowOutcome | null = null;
  const missing = s.sites.some((_, k) => optArr[k] === null && (baseArr[k] !== null || beyondSites[k]));
  if (!judgement && out.solver.status === 'completed' && (watch.crossedYears === null || missing)) {
    const breaks = segmentBreaks(s.transect);
    // The window reaches back behind the front wherever it is: a front still far from the clearing at the
    // horizon must be in the window to be projected (an empty window would look settled).
    const behind = windowBehindKm(s);
    const last = out.front.times.length - 1;
    const frontKm = geometry.direction > 0 ? out.front.rightKm[last] : out.front.leftKm[last];
    const back = Number.isFinite(frontKm) ? geometry.direction * Math.min(geometry.direction * geometry.nearKm, geometry.direction * frontKm) : geometry.nearKm;
    const window: [number, number] = geometry.direction > 0 ? [back - behind, breaks[breaks.length - 1]] : [breaks[0], back + behind];
    const extension = settings.extensionYears ?? 3 * s.horizonYears;
    const solver = makeWindowSolver(s, pieces, window, resolution, extension);
    projected = runWindow(solver, {
      start: { grid: out.problem.grid, u: out.u, h: out.h, t: out.solver.t },
      tEnd: out.solver.t + extension,
      geometry,
      stopOnCross: false,
      judge: watch.crossedYears === null,
      sitesKm: s.sites.map((x) => x.atKm),
      stopOnArrivals: true,
      arrivedBefore: approach.arrived,
      shouldCancel: settings.shouldCancel,
    });
    if (projected.outcome === 'pinned') judgement = projected.judgement;
  }
  const pinned = judgement?.verified === true;
  settings.onProgress?.(0.4, `critical width, option ${option.name}`);

  const critical = criticalWidth(s, option, { ...settings, baseline });
  const bracket = critical.bracketM;
  const marginal = bracket !== null && option.widthM >= bracket[0] - critical.toleranceM && option.widthM <= bracket[1] + critical.toleranceM;
  critical.marginal = marginal;

  settings.onProgress?.(0.8, `width–delay curve, option ${option.name}`);
  const widths = settings.curveWidthsM ?? s.barrier?.curveWidthsM ?? autoCurveWidths(option.widthM, bracket);
  const curve = settings.widthCurve === false ? [] : widthDelayCurve(s, option, crossing, baseArr, widths, resolution, settings.shouldCancel);
  const firstBeyond = s.sites.map((x, k) => ({ x, k })).filter(({ k }) => beyondSites[k]).sort((a, b) => geometry.direction * (a.x.atKm - b.x.atKm))[0];
  if (!critical.applicable && firstBeyond) critical.delayPer100mYears = delayPer100m(curve, firstBeyond.k);

  // A pest whose front cannot advance through the stand before the clearing never meets it: nothing to hold.
  const nearX = geometry.nearKm - geometry.direction * 1e-6;
  const nearPiece = buildLayout(s).find((p) => p.fromKm <= nearX && nearX < p.toKm);
  const cannotAdvance = crossing.crossedYears === null && nearPiece?.habitat === 'host-forest' && frontCannotAdvance(s.pest.growth, nearPiece.stocking);
  // A front that the layout already holds before this point (verified without the clearing) is not held by it.
  const heldWithout = crossing.crossedYears === null && critical.withoutClearing === 'pinned';
  const stalls = cannotAdvance || heldWithout;
  const stallReason = cannotAdvance
    ? 'in this model its front cannot advance even through unbroken host forest here (too few insects find mates, or losses exceed growth), so no clearing is needed to stop it'
    : 'even without this clearing the front is held before it or dies out here (verified on the layout as it stands), so this clearing is not what stops it';

  // Verdicts per site.
  const cost = s.barrier?.costPerStem !== undefined ? stemsRemoved(s, option, s.barrier?.lengthKm ?? 1) * s.barrier.costPerStem : null;
  const dtc = changeThreshold(resolution.stepYears);
  const sites: SiteVerdict[] = s.sites.map((site, k) => {
    const b = baseArr[k];
    let o = optArr[k];
    const beyond = beyondSites[k];
    const proj = o === null && projected ? projected.arrivals[k] : null;
    let kind: VerdictKind;
    let sentence: string;
    let delay: number | null = null;
    if (stalls && b === null && o === null) {
      kind = 'not-reached';
      sentence = `Not reached, with or without the clearing: ${stallReason}.`;
    } else if (pinned && beyond && !stalls) {
      kind = marginal ? 'marginal' : 'holds';
      const fringe = o !== null ? ` Low-density fringe beyond the clearing: the site sees density at the detection level from year ${o.toFixed(1)}, but no breeding population forms.` : '';
      sentence = marginal
        ? `Held in this run, but the width is within the critical-width uncertainty: small changes could let the pest through.${fringe}`
        : `Protected: the front is held at the clearing (holds indefinitely under this model).${fringe}`;
      o = null;
    } else if (b === null && o === null) {
      kind = 'not-reached';
      sentence = `Not reached within ${s.horizonYears} years, with or without the clearing.`;
    } else if (o === null) {
      kind = 'not-crossed';
      sentence =
        `Not reached within the ${s.horizonYears}-year horizon with the clearing (without it: year ${b!.toFixed(1)}); not shown to be held.` +
        (proj !== null && proj !== undefined ? ` Projected arrival: year ${proj.toFixed(1)}.` : ' The extended run did not reach it either.');
      if (proj !== null && proj !== undefined) delay = null;
    } else if (b === null) {
      kind = 'speeds-up';
      sentence = `Reached in year ${o.toFixed(1)} with the clearing but not within ${s.horizonYears} years without it.`;
    } else {
      delay = o - b;
      if (Math.abs(delay) < dtc) {
        kind = 'no-change';
        sentence = `No change: arrives in year ${o.toFixed(1)} either way.`;
      } else if (delay > 0) {
        kind = 'delays';
        sentence = `Arrives ${delay.toFixed(1)} years later than without the clearing (year ${o.toFixed(1)} instead of ${b.toFixed(1)}).`;
        if (beyond && (watch.crossedYears === null || o < watch.crossedYears)) {
          sentence += ' What arrives then is the thin fringe of insects ahead of the clearing; the breeding front had not crossed by then.';
        }
      } else {
        kind = 'speeds-up';
        sentence = `Arrives ${(-delay).toFixed(1)} years EARLIER than without the clearing (year ${o.toFixed(1)} instead of ${b.toFixed(1)}).`;
      }
    }
    return {
      name: site.name,
      atKm: site.atKm,
      beyondBarrier: beyond,
      baselineArrivalYears: b,
      optionArrivalYears: o,
      projectedArrivalYears: proj ?? null,
      delayYears: delay,
      kind,
      sentence,
      costPerYearOfDelay: cost !== null && delay !== null && delay > 0 ? cost / delay : null,
    };
  });

  // Overall verdict.
  const baseCross = crossing.crossedYears;
  const optCross = watch.crossedYears;
  const projCross = optCross === null ? (projected?.crossedYears ?? null) : null;
  let kind: VerdictKind;
  let sentence: string;
  const firstSite = firstBeyond ? sites[firstBeyond.k] : null;
  if (stalls && optCross === null) {
    kind = 'not-reached';
    sentence = cannotAdvance
      ? `The pest does not reach the clearing, with or without it: ${stallReason}.`
      : `The front does not get past this point, with or without the clearing: ${stallReason}.`;
  } else if (pinned) {
    kind = marginal ? 'marginal' : 'holds';
    sentence = marginal
      ? `Marginal: the front was held in this run, but ${option.widthM} m is within the critical-width bracket's uncertainty (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m).`
      : 'Holds: the front is pinned at the clearing and stays there (holds indefinitely under this model).';
  } else if (marginal) {
    kind = 'marginal';
    sentence = `Marginal: ${option.widthM} m is within the critical-width bracket (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m); near this width the front lingers for a long time and pinning was not verified.`;
  } else if (optCross === null && baseCross !== null) {
    kind = 'not-crossed';
    sentence =
      `Not crossed within the ${s.horizonYears}-year horizon (without the clearing the front passes this point in year ${baseCross.toFixed(1)}), but not shown to be pinned.` +
      (projCross !== null ? ` Projected crossing: year ${projCross.toFixed(1)}.` : ' The extended run neither crossed nor settled.');
  } else if (optCross === null && baseCross === null) {
    kind = 'not-reached';
    sentence = `The front does not reach this point within ${s.horizonYears} years, with or without the clearing.`;
  } else if (firstSite && firstSite.delayYears !== null) {
    kind = firstSite.kind;
    sentence =
      kind === 'delays'
        ? `Delays: arrival at ${firstSite.name} ${firstSite.delayYears.toFixed(1)} years later than without the clearing.`
        : kind === 'speeds-up'
          ? `Speeds up: arrival at ${firstSite.name} ${(-firstSite.delayYears).toFixed(1)} years earlier than without the clearing.`
          : `No change at ${firstSite.name}.`;
  } else {
    const d = baseCross !== null && optCross !== null ? optCross - baseCross : null;
    if (d === null) {
      kind = 'speeds-up';
      sentence = `Speeds up: the front crosses in year ${optCross!.toFixed(1)} but does not pass this point within the horizon without the clearing.`;
    } else if (Math.abs(d) < dtc) {
      kind = 'no-change';
      sentence = 'No change in when the front passes the clearing.';
    } else if (d > 0) {
      kind = 'delays';
      sentence = `Delays: the front passes the clearing ${d.toFixed(1)} years later than it passes the same place without it.`;
    } else {
      kind = 'speeds-up';
      sentence = `Speeds up: the front passes the clearing ${(-d).toFixed(1)} years earlier than it passes the same place without it.`;
    }
  }

  // Speeds: baseline in the direction of travel; option measured beyond the clearing.
  const dirName = geometry.direction > 0 ? 'right' : 'left';
  const baseSpeed = baseline.summary.spreadRates.find((r) => r.direction === dirName)?.kmPerYear ?? null;
  const breaks = segmentBreaks(s.transect);
  const end = geometry.direction > 0 ? breaks[breaks.length - 1] : breaks[0];
  const margin = 0.05 * (breaks[breaks.length - 1] - breaks[0]);
  const fitFrom = geometry.farKm + geometry.direction * 2 * movementLengthKm(s);
  const fitTo = end - geometry.direction * margin;
  const fit = spreadRate(out.front.times, geometry.direction > 0 ? out.front.rightKm : out.front.leftKm, { lowKm: Math.min(fitFrom, fitTo), highKm: Math.max(fitFrom, fitTo) }, geometry.direction);
  const stems = stemsRemoved(s, option, s.barrier?.lengthKm ?? 1);

  const result: OptionResult = {
    name: option.name,
    fromKm: option.fromKm,
    widthM: option.widthM,
    cover: option.cover,
    run,
    verdict: { kind, sentence, why: reasonInWords(s, option.cover, kind) },
    pinned,
    pinning: judgement
      ? { verified: true, method: judgement.method, detail: judgement.detail }
      : {
          verified: false,
          method: PINNING_METHODS[pinningMode(s, 1)],
          detail:
            optCross !== null
              ? 'not pinned: the front crossed the clearing'
              : pinningMode(s, 1) === 'none'
                ? 'not applicable: no strong Allee effect'
                : 'no verified steady state: a front that is still at the clearing when the run ends is not evidence of pinning (near the critical width fronts linger for a long time)',
        },
    crossingYears: { baseline: baseCross, option: optCross, projected: projCross },
    sites,
    criticalWidth: stripInternals(critical),
    widthDelay: curve,
    speeds: { baselineKmPerYear: baseSpeed, optionKmPerYear: fit ? fit.kmPerYear : null },
    trees: { stemsRemoved: stems, cost, costUnit: s.barrier?.costUnit ?? null },
  };
  return { result, critical };
}

function stripInternals(c: CriticalWidthOutcome): CriticalWidth {
  return {
    applicable: c.applicable,
    note: c.note,
    bracketM: c.bracketM,
    toleranceM: c.toleranceM,
    runs: c.runs,
    phasePlaneM: c.phasePlaneM,
    phasePlaneNote: c.phasePlaneNote,
    phasePlaneAssumesIntactHosts: c.phasePlaneAssumesIntactHosts,
    marginal: c.marginal,
    delayPer100mYears: c.delayPer100mYears,
    halfStepCheck: c.halfStepCheck,
    windowCheck: c.windowCheck,
  };
}
