/**
 * Everything about one barrier option (verdict/): the option run, verified pinning or the projected crossing,
 * the verdict per protected site and overall (rules: server/analysis/README.md), critical width, width–delay
 * curve, speeds, trees and cost.
 */
import type { PointScenario } from '../../model/scenario.ts';
import { segmentBreaks } from '../../model/scenario.ts';
import { Schedule, type Observer } from '../../numerics/time-loop.ts';
import { discretise, growthRateScale } from '../../problem/discretise.ts';
import { stemsRemoved } from '../../problem/layout.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { mergedResolution as mergedResolutionOf } from '../../problem/resolution.ts';
import { makeEngineStepper, runLayout, summariseRun } from '../run/simulate.ts';
import { ArrivalTracker } from '../run/trackers.ts';
import { spreadRate } from '../run/speed.ts';
import type { CriticalWidth, OptionResult, SiteVerdict, VerdictKind } from '../result.ts';
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

import { analyseBaseline, checkOption, optionKey, windowBehindKm, type BarrierOptionSpec, type BarrierSettings } from '../run/baseline.ts';
import { criticalWidth, type CriticalWidthOutcome } from '../critical-width/critical-width.ts';
import { autoCurveWidths, delayPer100m, widthDelayCurve } from '../width-delay/width-delay.ts';
import { changeThreshold, reasonInWords } from './reasons.ts';

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
  const problem = discretise(p, pieces, resolution);
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
    const solver = makeWindowSolver(p, pieces, window, resolution, extension);
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

  const critical = criticalWidth(p, option, { ...settings, baseline });
  const bracket = critical.bracketM;
  const marginal = bracket !== null && option.widthM >= bracket[0] - critical.toleranceM && option.widthM <= bracket[1] + critical.toleranceM;
  critical.marginal = marginal;

  settings.onProgress?.(0.8, `width–delay curve, option ${option.name}`);
  const widths = settings.curveWidthsM ?? s.barrier?.curveWidthsM ?? autoCurveWidths(option.widthM, bracket);
  const curve = settings.widthCurve === false ? [] : widthDelayCurve(p, option, crossing, baseArr, widths, resolution, settings.shouldCancel);
  const firstBeyond = s.sites.map((x, k) => ({ x, k })).filter(({ k }) => beyondSites[k]).sort((a, b) => geometry.direction * (a.x.atKm - b.x.atKm))[0];
  if (!critical.applicable && firstBeyond) critical.delayPer100mYears = delayPer100m(curve, firstBeyond.k);

  // A pest whose front cannot advance through the stand before the clearing never meets it: nothing to hold.
  const nearX = geometry.nearKm - geometry.direction * 1e-6;
  const nearPiece = layoutOf(p).find((p) => p.fromKm <= nearX && nearX < p.toKm);
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
      ? `Marginal: the front was held in this run, but ${option.widthM} m is within the uncertainty of the narrowest width that stops the front (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m).`
      : 'Holds: the front stops at the clearing and stays there (holds indefinitely under this model; in technical terms the front is pinned).';
  } else if (marginal) {
    kind = 'marginal';
    sentence = `Marginal: ${option.widthM} m is within the uncertainty of the narrowest width that stops the front (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m); near this width the front lingers for a long time and it was not shown to stop for good.`;
  } else if (optCross === null && baseCross !== null) {
    kind = 'not-crossed';
    sentence =
      `Not crossed within the ${s.horizonYears}-year horizon (without the clearing the front passes this point in year ${baseCross.toFixed(1)}), but not shown to stop there for good.` +
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
              ? 'not stopped (not pinned): the front crossed the clearing'
              : pinningMode(s, 1) === 'none'
                ? 'not applicable: small groups of this pest do not die out (no strong Allee effect), so no clearing stops it'
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
