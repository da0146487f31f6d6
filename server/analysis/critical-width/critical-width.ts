/**
 * Critical width for containment: the smallest clearing width that pins the front, bracketed by bisection
 * on full-model window runs started from the baseline snapshot, seeded by the phase-plane (first-integral)
 * criterion (methods note §5.3), with half-step and doubled-window checks of the bracket.
 */
import type { PointScenario } from '../../model/scenario.ts';
import { habitatCoefficients } from '../../model/habitat.ts';
import { equilibria } from '../../model/growth.ts';
import { criticalGapWidth } from '../../numerics/steady-blocking.ts';
import { growthRateScale, type Resolution } from '../../problem/discretise.ts';
import { type ClearingSpec } from '../../problem/layout.ts';
import { withFarEdge } from '../../problem/geometry.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { mergedResolution as mergedResolutionOf } from '../../problem/resolution.ts';
import type { CriticalWidth } from '../result.ts';
import { potential, potentialThreshold, strongAllee } from '../run/barrier-growth.ts';
import { hasStrongAllee } from '../../model/growth.ts';
import { 
  PINNING_METHODS,
  barrierGeometry,
  isBeyond,
  makeWindowSolver,
  movementLengthKm,
  pinningMode,
  runWindow,
  windowAheadKm,
  type BarrierGeometry,
  type StartState } from '../run/barrier-run.ts';

import { DEFAULT_TOLERANCE_M, analyseBaseline, checkOption, optionKey, snapshotDistanceKm, type BarrierOptionSpec, type BarrierSettings, type BaselineCrossing } from '../run/baseline.ts';

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
  p: Problem;
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
function maxUsableWidthM(p: Problem, g: BarrierGeometry): number {
  const s = p.scenario;
  const pieces = layoutOf(p);
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
  const g: BarrierGeometry = clearing ? barrierGeometry(c.s, clearing) : withFarEdge(c.geometry, c.geometry.nearKm);
  const pieces = layoutOf(c.p, clearing ?? undefined);
  const d = g.direction;
  const behind = c.behindKm * windowFactor;
  const ahead = c.aheadKm * windowFactor;
  const ends = [g.nearKm - d * behind, g.farKm + d * ahead];
  const resolution = { ...c.resolution, stepYears: c.resolution.stepYears * stepFactor };
  const solver = makeWindowSolver(c.p, pieces, [Math.min(...ends), Math.max(...ends)], resolution, c.budgetYears);
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
export function phasePlaneWidth(sp: PointScenario | Problem, option: ClearingSpec): { widthM: number | null; note: string; assumesIntactHosts?: boolean } {
  const p = asProblem(sp);
  const s = p.scenario;
  const g = barrierGeometry(s, option);
  const pieces = layoutOf(p);
  const at = (x: number) => pieces.find((p) => p.fromKm <= x && x < p.toKm) ?? pieces[pieces.length - 1];
  const before = at(g.nearKm - g.direction * 1e-6);
  const after = at(g.farKm + g.direction * 1e-6);
  if (before.habitat !== 'host-forest' || after.habitat !== 'host-forest' || !(before.stocking > 0) || !(after.stocking > 0)) {
    return { widthM: null, note: 'the phase-plane criterion needs host forest on both sides of the clearing' };
  }
  const gr = s.pest.growth;
  if (!strongAllee(gr, after.stocking) || !strongAllee(gr, before.stocking)) {
    const why = hasStrongAllee(gr, after.stocking)
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
function baselineFor(p: Problem, option: ClearingSpec, settings: BarrierSettings): BaselineCrossing {
  const known = settings.baseline?.crossings.get(optionKey(option));
  if (known) return known;
  return analyseBaseline(p, [option], { record: false, shouldCancel: settings.shouldCancel }).crossings.get(optionKey(option))!;
}

/** The search's state: the runs so far and the bracket [lo crossed, hi pinned] they give. */
interface Bracketing {
  history: WidthRun[];
  /** Widest seen to let the front through (0 = the baseline). */
  lo: number;
  /** Narrowest verified to pin. */
  hi: number | null;
  classify(widthM: number, stepFactor?: number, windowFactor?: number): WidthRun;
  record(r: WidthRun): void;
}

function makeBracketing(c: WidthProbeContext, settings: BarrierSettings): Bracketing {
  const b: Bracketing = {
    history: [],
    lo: 0,
    hi: null,
    classify(w, stepFactor = 1, windowFactor = 1) {
      const r = classifyWidth(c, w, stepFactor, windowFactor);
      b.history.push(r);
      settings.onProgress?.(Math.min(0.95, b.history.length / 14), `critical width (${Math.round(w)} m)`);
      return r;
    },
    record(r) {
      if (r.outcome === 'pinned') b.hi = b.hi === null ? r.widthM : Math.min(b.hi, r.widthM);
      else b.lo = Math.max(b.lo, r.widthM);
    },
  };
  return b;
}

/** The window-run context of one option's bisection, from its baseline snapshot. */
function probeContext(p: Problem, option: ClearingSpec, geometry: BarrierGeometry, snapshot: StartState, settings: BarrierSettings): WidthProbeContext {
  const s = p.scenario;
  return {
    p,
    s,
    option,
    geometry,
    snapshot,
    resolution: mergedResolutionOf(p, [option]),
    budgetYears: Math.max(s.horizonYears, 150 / growthRateScale(s.pest.growth)),
    behindKm: snapshotDistanceKm(s) + 8 * movementLengthKm(s),
    // Beyond the fringe's reach as much again: a reflecting cut too close behind the fringe lets density pile up.
    aheadKm: windowAheadKm(s),
    shouldCancel: settings.shouldCancel,
  };
}

/**
 * The width-0 run, when the baseline did not pass this point within the horizon: a front already held
 * before the clearing (by the existing layout) needs no clearing, and one that never gets there gives
 * nothing to bracket. Returns the outcome to report, or null when the front crossed and the search goes on.
 */
function withoutClearingOutcome(c: WidthProbeContext, b: Bracketing, base: CriticalWidthOutcome, pinningMethod: string): CriticalWidthOutcome | null {
  const r0 = b.classify(0);
  if (r0.outcome === 'crossed') return null;
  const held = r0.outcome === 'pinned';
  return {
    ...base,
    applicable: true,
    bracketM: held ? [0, 0] : null,
    runs: b.history.length,
    history: b.history,
    withoutClearing: r0.outcome,
    windowKm: { behind: c.behindKm, ahead: c.aheadKm },
    note: held
      ? `Even without a clearing the front is held before this point (verified: ${pinningMethod}): no clearing is needed here under this model.`
      : `Without any clearing the front did not get past this point within ${Math.round(c.budgetYears)} years of the window run either (it stalls or dies out before it), so there is no critical width to find.`,
  };
}

/** Seeds (the phase-plane value −10 %, +15 % when known, else the option's width), then doubling until a width pins. */
function findPinningWidth(b: Bracketing, option: ClearingSpec, phasePlaneM: number | null, toleranceM: number, maxW: number): void {
  const seeds = phasePlaneM !== null && phasePlaneM > 0 ? [0.9 * phasePlaneM, 1.15 * phasePlaneM] : [option.widthM];
  for (const w of seeds) if (w < maxW) b.record(b.classify(w));
  let w = Math.max(b.lo, option.widthM);
  while (b.hi === null) {
    w = Math.max(2 * w, 2 * toleranceM);
    if (w > maxW) break;
    b.record(b.classify(w));
  }
}

/** Bisection of [lo, hi] down to the tolerance, at the given step factor. */
function bisect(b: Bracketing, toleranceM: number, stepFactor: number): void {
  while (b.hi! - b.lo > toleranceM) b.record(b.classify(0.5 * (b.lo + b.hi!), stepFactor));
}

/**
 * The bracket checks: a crossing at the lower end could be an artefact of the time step (splitting shifts
 * the discrete threshold by O(dt²)), so it is repeated with half the step, and if it then pins the
 * bisection continues at the finer step; then both ends on a window twice as large.
 */
function checkBracket(b: Bracketing, toleranceM: number): Pick<CriticalWidthOutcome, 'halfStepCheck' | 'windowCheck'> {
  let halfStepCheck: CriticalWidthOutcome['halfStepCheck'] = null;
  let stepFactor = 1;
  if (b.lo > 0) {
    const r = b.classify(b.lo, 0.5);
    halfStepCheck = { widthM: b.lo, outcome: r.outcome };
    if (r.outcome === 'pinned') {
      stepFactor = 0.5;
      const lo = b.lo;
      b.hi = lo;
      b.lo = Math.max(0, ...b.history.filter((x) => x.outcome !== 'pinned' && x.widthM < lo).map((x) => x.widthM));
      bisect(b, toleranceM, stepFactor);
    }
  }
  const ends = [b.lo, b.hi!].filter((x) => x > 0);
  const again = ends.map((x) => b.classify(x, stepFactor, 2));
  return { halfStepCheck, windowCheck: { widthsM: ends, agreed: again.every((r, k) => (r.outcome === 'pinned') === (ends[k] === b.hi)) } };
}

/** The bisection's note: its window, its runs and what the bracket checks found. */
function bisectionNote(c: WidthProbeContext, history: WidthRun[], windowCheck: CriticalWidthOutcome['windowCheck'], pinningMethod: string): string {
  const undecided = history.filter((r) => r.outcome === 'open').length;
  return (
    `Bisection on full-model runs (window ${c.behindKm.toFixed(1)} km behind and ${c.aheadKm.toFixed(1)} km beyond the clearing, started from the baseline as the front approached): ` +
    `${history.length} runs; “stops” means checked (${pinningMethod}).` +
    (undecided ? ` ${undecided} run(s) ended undecided and were counted as not stopping the front.` : '') +
    (windowCheck === null
      ? ' Bracket checks (half step, doubled window) switched off.'
      : windowCheck.agreed
        ? ' A window twice as large gives the same outcome at both ends.'
        : ' WARNING: a window twice as large changed an outcome; treat the bracket with caution.')
  );
}

/** The outcome before any run: the phase-plane value and empty search fields. */
function emptyOutcome(p: Problem, option: ClearingSpec, settings: BarrierSettings, toleranceM: number): CriticalWidthOutcome {
  const pp: ReturnType<typeof phasePlaneWidth> =
    settings.phasePlane === false ? { widthM: null, note: 'phase-plane value not computed (switched off)' } : phasePlaneWidth(p, option);
  return {
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
}

/**
 * Critical width for containment: the smallest width that pins the front, bracketed [crossed, pinned]
 * to the tolerance by bisection on full-model runs in a window around the clearing, started from the
 * baseline state as the front approaches. Pinned means verified (see PinningJudge); a run that only
 * lingers counts as not pinned. The lower end is repeated with the step halved, and both ends on a
 * window twice as large. For growth without a strong Allee effect no width pins a front.
 */
export function criticalWidth(sp: PointScenario | Problem, option: BarrierOptionSpec | ClearingSpec, settings: BarrierSettings = {}): CriticalWidthOutcome {
  const p = asProblem(sp);
  const s = p.scenario;
  checkOption(s, { name: 'option', ...option });
  const toleranceM = settings.toleranceM ?? s.barrier?.toleranceM ?? DEFAULT_TOLERANCE_M;
  const geometry = barrierGeometry(s, option);
  const base = emptyOutcome(p, option, settings, toleranceM);
  // Host forest with some stretch beyond the clearing (its far end lies beyond, whatever its midpoint).
  const beyond = layoutOf(p).filter((p) => p.habitat === 'host-forest' && p.stocking > 0 && isBeyond(geometry, geometry.direction > 0 ? p.toKm : p.fromKm));
  const mode = pinningMode(s, Math.max(0, ...beyond.map((p) => p.stocking)));
  if (mode === 'none') {
    return {
      ...base,
      note: 'No finite clearing pins a front in this model: without a strong Allee effect in the forest beyond, any insects that cross found a growing population. A clearing can only change when the pest arrives (see the delay per 100 m of width; negative means it arrives sooner).',
    };
  }
  if (settings.criticalWidth === false) return { ...base, applicable: true, note: 'critical width not computed (switched off)' };
  const crossing = baselineFor(p, option, settings);
  if (!crossing.snapshot) {
    return {
      ...base,
      applicable: true,
      note: 'The front does not come near the clearing within the horizon in the baseline run, so the bisection has no arriving front to test; see the phase-plane value.',
    };
  }
  const c = probeContext(p, option, geometry, crossing.snapshot, settings);
  const windowKm = { behind: c.behindKm, ahead: c.aheadKm };
  const b = makeBracketing(c, settings);
  // The bisection takes width 0 (the stand as it stands) to let the front through; when the baseline did
  // not pass this point within the horizon, that is run first.
  if (crossing.crossedYears === null) {
    const settled = withoutClearingOutcome(c, b, base, PINNING_METHODS[mode]);
    if (settled) return settled;
  }
  findPinningWidth(b, option, base.phasePlaneM, toleranceM, maxUsableWidthM(p, geometry));
  if (b.hi === null) {
    return {
      ...base,
      applicable: true,
      runs: b.history.length,
      history: b.history,
      note: `No width up to ${Math.round(b.lo)} m was verified to pin the front (the transect leaves no room for wider clearings, or runs ended undecided).`,
      windowKm,
    };
  }
  bisect(b, toleranceM, 1);
  const checks = settings.bracketChecks === false ? { halfStepCheck: null, windowCheck: null } : checkBracket(b, toleranceM);
  return {
    ...base,
    applicable: true,
    bracketM: [b.lo, b.hi],
    runs: b.history.length,
    history: b.history,
    ...checks,
    windowKm,
    note: bisectionNote(c, b.history, checks.windowCheck, PINNING_METHODS[mode]),
  };
}
