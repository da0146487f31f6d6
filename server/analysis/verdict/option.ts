/**
 * Everything about one barrier option (verdict/): the option run, verified pinning or the projected crossing,
 * the verdict per protected site and overall (rules: server/analysis/README.md), critical width, width–delay
 * curve, speeds, trees and cost.
 */
import type { PointScenario } from '../../model/scenario.ts';
import { segmentBreaks } from '../../model/scenario.ts';
import { Schedule, type Observer } from '../../numerics/time-loop.ts';
import { discretise, growthRateScale } from '../../problem/discretise.ts';
import type { BarrierGeometry } from '../../problem/geometry.ts';
import { stemsRemoved, type Piece } from '../../problem/layout.ts';
import { asProblem, layoutOf, type Problem, type Resolution } from '../../problem/problem.ts';
import { mergedResolution as mergedResolutionOf } from '../../problem/resolution.ts';
import { makeEngineStepper, runLayout, summariseRun } from '../run/simulate.ts';
import { ArrivalTracker } from '../run/trackers.ts';
import { spreadRate } from '../run/speed.ts';
import type { CriticalWidth, OptionResult, RunResult } from '../result.ts';
import { frontCannotAdvance } from '../run/barrier-growth.ts';
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
  type Judgement,
  type WindowOutcome } from '../run/barrier-run.ts';

import { analyseBaseline, checkOption, optionKey, windowBehindKm, type BarrierOptionSpec, type BarrierSettings, type BaselineAnalysis } from '../run/baseline.ts';
import { criticalWidth, type CriticalWidthOutcome } from '../critical-width/critical-width.ts';
import { autoCurveWidths, delayPer100m, widthDelayCurve } from '../width-delay/width-delay.ts';
import { changeThreshold, reasonInWords } from './reasons.ts';
import { overallVerdict, siteVerdicts, type Stall } from './rules.ts';

/** Full result of one option, with internals the caller may want (the result document takes OptionResult). */
export interface OptionAnalysis {
  result: OptionResult;
  critical: CriticalWidthOutcome;
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
export function analyseOption(sp: PointScenario | Problem, option: BarrierOptionSpec, settings: BarrierSettings = {}): OptionAnalysis {
  const p = asProblem(sp);
  const s = p.scenario;
  checkOption(s, option);
  const record = settings.record ?? true;
  const geometry = barrierGeometry(s, option);
  const baseline = settings.baseline?.crossings.has(optionKey(option)) ? settings.baseline : analyseBaseline(p, [option], { record, shouldCancel: settings.shouldCancel });
  const crossing = baseline.crossings.get(optionKey(option))!;
  const resolution = mergedResolutionOf(p, [option]);
  const pieces = layoutOf(p, option);
  const ran = runOption(p, option, geometry, pieces, resolution, record, settings);
  const { out, run, watch } = ran;
  const baseArr = baseline.summary.arrivals.map((a) => a.arrivalYears);
  const optArr = run.arrivals.map((a) => a.arrivalYears);
  const beyondSites = s.sites.map((site) => isBeyond(geometry, site.atKm));
  const { judgement, projected } = pastHorizon(p, geometry, pieces, resolution, ran, baseArr, optArr, beyondSites, settings);
  const pinned = judgement?.verified === true;
  settings.onProgress?.(0.4, `critical width, option ${option.name}`);

  const critical = criticalWidth(p, option, { ...settings, baseline });
  const bracket = critical.bracketM;
  const marginal = bracket !== null && option.widthM >= bracket[0] - critical.toleranceM && option.widthM <= bracket[1] + critical.toleranceM;
  critical.marginal = marginal;

  settings.onProgress?.(0.8, `width–delay curve, option ${option.name}`);
  const widths = settings.curveWidthsM ?? s.barrier?.curveWidthsM ?? autoCurveWidths(option.widthM, bracket);
  const curve = settings.widthCurve === false ? [] : widthDelayCurve(p, option, crossing, baseArr, widths, resolution, settings.shouldCancel);
  const firstBeyond = s.sites.map((x, k) => ({ x, k })).filter(({ k }) => beyondSites[k]).sort((a, b) => geometry.direction * (a.x.atKm - b.x.atKm))[0];
  if (!critical.applicable && firstBeyond) critical.delayPer100mYears = delayPer100m(curve, firstBeyond.k);

  const stall = stallOf(p, geometry, crossing.crossedYears, critical);
  const cost = s.barrier?.costPerStem !== undefined ? stemsRemoved(s, option, s.barrier?.lengthKm ?? 1) * s.barrier.costPerStem : null;
  const dtc = changeThreshold(resolution.stepYears);
  const sites = siteVerdicts(s, { baseArr, optArr, beyondSites, projected, pinned, marginal, stall, cost, dtc, crossedYears: watch.crossedYears });
  const firstSite = firstBeyond ? sites[firstBeyond.k] : null;
  const optCross = watch.crossedYears;
  const projCross = optCross === null ? (projected?.crossedYears ?? null) : null;
  const { kind, sentence } = overallVerdict(s, option, { baseCross: crossing.crossedYears, optCross, projCross, stall, pinned, marginal, bracket, firstSite, dtc });
  const speeds = optionSpeeds(s, geometry, baseline, out);
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
              ? 'not stopped: the front crossed the clearing'
              : pinningMode(s, 1) === 'none'
                ? 'not applicable: small groups of this pest do not die out (no strong Allee effect), so no clearing stops its front for good'
                : 'not shown to stay stopped: a front still at the clearing when the run ends is no evidence that it stays there (near the critical width fronts linger for a long time; no steady state was verified)',
        },
    crossingYears: { baseline: crossing.crossedYears, option: optCross, projected: projCross },
    sites,
    criticalWidth: stripInternals(critical),
    widthDelay: curve,
    speeds,
    trees: { stemsRemoved: stems, cost, costUnit: s.barrier?.costUnit ?? null },
  };
  return { result, critical };
}

interface OptionRun {
  out: ReturnType<typeof runLayout>;
  run: RunResult;
  watch: CrossingWatch;
  approach: ApproachWatch;
  earlyJudgement: Judgement | null;
}

/**
 * The option's run to the horizon, watching the crossing and whether the pest reaches the clearing. Without
 * recorded profiles the run stops as soon as pinning is verified on the whole transect (nothing changes
 * after that); with profiles it runs to the horizon so that charts cover it.
 */
function runOption(p: Problem, option: BarrierOptionSpec, geometry: BarrierGeometry, pieces: Piece[], resolution: Resolution, record: boolean, settings: BarrierSettings): OptionRun {
  const s = p.scenario;
  const problem = discretise(p, pieces, resolution);
  const levels = establishedLevels(s, problem);
  const watch = new CrossingWatch(problem.grid, geometry, levels, false, crossingProbeKm(s), s.detectionLevel);
  let earlyJudgement: Judgement | null = null;
  // Whether the pest reaches the clearing in this run (a die-out past the horizon only counts as held if it did).
  const approach = new ApproachWatch(s, problem, geometry);
  const observers: Observer[] = [watch, approach];
  if (!record) {
    const { op, stepper } = makeEngineStepper(problem);
    const judgeSolver = {
      scenario: s,
      problem,
      op,
      stepper,
      windowKm: [problem.grid.facesKm[0], problem.grid.facesKm[problem.grid.nCells]] as [number, number],
      establishedAtCells: levels,
    };
    const judge = new PinningJudge(judgeSolver, geometry);
    const every = Math.max(1, Math.round(Math.max(0.5, 2 / growthRateScale(s.pest.growth)) / resolution.stepYears));
    const checks = Schedule.periodic(every * resolution.stepYears);
    const arrived = new ArrivalTracker(problem.grid, s.sites.map((x) => x.atKm), s.detectionLevel);
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
    scenario: p,
    pieces,
    resolution,
    problem,
    record,
    observers,
    shouldCancel: settings.shouldCancel,
    onProgress: (f) => settings.onProgress?.(0.3 * f, `option ${option.name}`),
  });
  const run = summariseRun(out, p);
  return { out, run, watch, approach, earlyJudgement };
}

/** Past the horizon: verify pinning, or project the crossing and the arrivals that did not happen in time. */
function pastHorizon(
  p: Problem,
  geometry: BarrierGeometry,
  pieces: Piece[],
  resolution: Resolution,
  ran: OptionRun,
  baseArr: (number | null)[],
  optArr: (number | null)[],
  beyondSites: boolean[],
  settings: BarrierSettings,
): { judgement: Judgement | null; projected: WindowOutcome | null } {
  const s = p.scenario;
  const { out, watch, approach } = ran;
  let judgement: Judgement | null = ran.earlyJudgement;
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
    const solver = makeWindowSolver(p, pieces, window, resolution, extension);
    projected = runWindow(solver, {
      start: { mesh: out.problem.mesh, u: out.u, h: out.h, t: out.solver.t },
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
  return { judgement, projected };
}


/** A front that never meets the clearing, or that the layout holds before it without the clearing: nothing for the clearing to hold. */
function stallOf(p: Problem, geometry: BarrierGeometry, baselineCrossedYears: number | null, critical: CriticalWidthOutcome): Stall {
  const s = p.scenario;
  // A pest whose front cannot advance through the stand before the clearing never meets it: nothing to hold.
  const nearX = geometry.nearKm - geometry.direction * 1e-6;
  const nearPiece = layoutOf(p).find((p) => p.fromKm <= nearX && nearX < p.toKm);
  const cannotAdvance = baselineCrossedYears === null && nearPiece?.habitat === 'host-forest' && frontCannotAdvance(s.pest.growth, nearPiece.stocking);
  // A front that the layout already holds before this point (verified without the clearing) is not held by it.
  const heldWithout = baselineCrossedYears === null && critical.withoutClearing === 'pinned';
  const stalls = cannotAdvance || heldWithout;
  const reason = cannotAdvance
    ? 'in this model its front cannot advance even through unbroken host forest here (too few insects find mates, or losses exceed growth), so no clearing is needed to stop it'
    : 'even without this clearing the front is held before it or dies out here (verified on the layout as it stands), so this clearing is not what stops it';
  return { stalls, cannotAdvance, reason };
}

/** Spread rates: the baseline's in the direction of travel, and the option's measured beyond the clearing. */
function optionSpeeds(s: PointScenario, geometry: BarrierGeometry, baseline: BaselineAnalysis, out: ReturnType<typeof runLayout>): OptionResult['speeds'] {
  const dirName = geometry.direction > 0 ? 'right' : 'left';
  const baseSpeed = baseline.summary.spreadRates.find((r) => r.direction === dirName)?.kmPerYear ?? null;
  const breaks = segmentBreaks(s.transect);
  const end = geometry.direction > 0 ? breaks[breaks.length - 1] : breaks[0];
  const margin = 0.05 * (breaks[breaks.length - 1] - breaks[0]);
  const fitFrom = geometry.farKm + geometry.direction * 2 * movementLengthKm(s);
  const fitTo = end - geometry.direction * margin;
  const fit = spreadRate(out.front.times, geometry.direction > 0 ? out.front.rightKm : out.front.leftKm, { lowKm: Math.min(fitFrom, fitTo), highKm: Math.max(fitFrom, fitTo) }, geometry.direction);
  return { baselineKmPerYear: baseSpeed, optionKmPerYear: fit ? fit.kmPerYear : null };
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
