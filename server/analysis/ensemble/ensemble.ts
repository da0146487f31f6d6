/**
 * Ensemble over uncertain parameters: Latin hypercube draws of every distribution in a scenario, one
 * evaluation per draw (baseline and each barrier option), and the summary in probabilities with Monte
 * Carlo standard errors and a partial-rank-correlation sensitivity ranking.
 *
 * Reproducibility: draw i depends only on (scenario, seed, i). The design is built from the seed's child
 * stream 0; nothing else is random. So a given seed gives identical results whether the draws run in this
 * thread or on a worker pool of any size (see jobs/parallel.ts).
 */
import { type PointScenario, type Scenario } from '../../model/scenario.ts';
import { discretise } from '../../problem/discretise.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { runLayout } from '../run/simulate.ts';
import { analyseBaseline, analyseOption, criticalWidth, mergedResolution } from '../verdict/barrier.ts';
import { CrossingWatch, crossingProbeKm, establishedLevels } from '../run/barrier-run.ts';
import { barrierGeometry, isBeyond } from '../../problem/geometry.ts';
import { ArrivalTracker } from '../run/trackers.ts';
import { BypassTracker, bandWidth, effectiveRate, makeSurvivalKernel, sourceWeights } from '../bypass/bypass.ts';
import type { 
  UncertaintyResult } from '../result.ts';
import { drawScenario, drawToleranceM, type DrawOutcome, type EnsemblePlan, type PointOutcome, planEnsemble } from './plan.ts';
import { summariseEnsemble } from './summary.ts';

export * from './plan.ts';
export * from './summary.ts';


/** Expected number of established introductions beyond an option's clearing, up to `untilYears` (a run of the option layout). */
export function bypassLambda(sp: PointScenario | Problem, option: { fromKm: number; widthM: number; cover: 'clearing' | 'non-host-forest' }, untilYears: number, shouldCancel?: () => boolean): number {
  const p = asProblem(sp);
  const s = p.scenario;
  const t = s.transport!;
  const pieces = layoutOf(p, option);
  const problem = discretise(p, pieces);
  const { grid, hostAtCells } = problem;
  const tracker = new BypassTracker([sourceWeights(grid, hostAtCells, barrierGeometry(s, option), makeSurvivalKernel(t.kernel), bandWidth(s))], effectiveRate(t), s.detectionLevel, []);
  runLayout({ scenario: p, pieces, problem, record: false, tEnd: Math.max(untilYears, 1e-6), observers: [tracker], shouldCancel });
  return tracker.total();
}

/**
 * Evaluates one point scenario for the ensemble with the barrier analysis.
 *
 * With per-draw critical widths (the default): the baseline (analyseBaseline), one run of each option layout
 * (crossing within the horizon and arrivals, stopped once both are known) and the critical width
 * (criticalWidth: bisection on window runs). "Pinned" then follows from the critical width: the option is at
 * least as wide as a width verified to pin the front (wider clearings are harder to cross); this saves the
 * option's own pinning run. Without critical widths: analyseOption's own verified pinning.
 */
export function evaluatePoint(sp: PointScenario | Problem, settings: { criticalWidth?: boolean; shouldCancel?: () => boolean } = {}): PointOutcome {
  const p = asProblem(sp);
  const s = p.scenario;
  const options = s.barrier?.options ?? [];
  const shouldCancel = settings.shouldCancel;
  const withWidth = settings.criticalWidth ?? true;
  const base = analyseBaseline(p, options, { record: false, shouldCancel });
  const baselineArrivals = base.summary.arrivals.map((a) => a.arrivalYears);
  const outcomes = options.map((o) => {
    const geometry = barrierGeometry(s, o);
    const beyond = s.sites.map((site) => isBeyond(geometry, site.atKm));
    let crossingYears: number | null;
    let arrivals: (number | null)[];
    let pinned: boolean;
    let criticalWidthM: number | null = null;
    if (withWidth) {
      // Per draw: no phase-plane seed and no bracket re-checks (their cost is most of a draw's; the checks
      // verify the method, which the single central-value analysis reports).
      const c = criticalWidth(p, o, { baseline: base, record: false, toleranceM: drawToleranceM(s, o.widthM), phasePlane: false, bracketChecks: false, shouldCancel });
      if (!c.applicable) criticalWidthM = Infinity;
      else if (c.bracketM) criticalWidthM = c.bracketM[1];
      // Without any clearing the front never got past this point (it stalls or dies out first): nothing to bracket.
      else if (c.withoutClearing === 'open') criticalWidthM = null;
      else if (c.runs > 0) criticalWidthM = Infinity;
      else criticalWidthM = c.phasePlaneM;
      // Verified to pin at a width no wider than the option: wider clearings are harder to cross.
      pinned = criticalWidthM !== null && Number.isFinite(criticalWidthM) && o.widthM >= criticalWidthM && c.bracketM !== null;
      const nearSites = beyond.some((b) => !b);
      if (pinned && !nearSites) {
        // Held, and every site lies beyond: the option run could only confirm that nothing arrives.
        crossingYears = null;
        arrivals = s.sites.map(() => null);
      } else {
        const resolution = mergedResolution(p, [o]);
        const pieces = layoutOf(p, o);
        const problem = discretise(p, pieces, resolution);
        const watch = new CrossingWatch(problem.grid, geometry, establishedLevels(s, problem), false, crossingProbeKm(s), s.detectionLevel);
        const siteArrivals = new ArrivalTracker(problem.grid, s.sites.map((x) => x.atKm), s.detectionLevel);
        // Stop once the outcome is known: crossing and all arrivals, or (held) the sites on the near side.
        const done = () =>
          pinned ? siteArrivals.arrivalYears.every((a, k) => beyond[k] || a !== null) : watch.crossedYears !== null && siteArrivals.allArrived();
        const out = runLayout({ scenario: p, pieces, resolution, problem, record: false, regularOutputs: false, shouldCancel, observers: [watch, siteArrivals, { handle: done }] });
        crossingYears = pinned ? null : watch.crossedYears;
        arrivals = out.arrivals.arrivalYears.map((a, k) => (pinned && beyond[k] ? null : a));
        if (crossingYears !== null) pinned = false;
      }
    } else {
      const r = analyseOption(p, o, { baseline: base, record: false, widthCurve: false, criticalWidth: false, shouldCancel }).result;
      crossingYears = r.crossingYears.option;
      arrivals = r.sites.map((x) => x.optionArrivalYears);
      pinned = r.pinned;
    }
    return {
      crossingYears,
      arrivals,
      pinned,
      criticalWidthM,
      bypassLambda: s.transport ? bypassLambda(p, o, crossingYears ?? s.horizonYears, shouldCancel) : null,
    };
  });
  return { baselineArrivals, options: outcomes };
}

/** Evaluates draw i of the plan. */
export function evaluateDraw(scenario: Scenario, plan: EnsemblePlan, i: number, shouldCancel?: () => boolean): DrawOutcome {
  const { problem, values, clipped } = drawScenario(scenario, plan, i);
  return { index: i, values, clipped, ...evaluatePoint(problem, { criticalWidth: scenario.uncertainty?.criticalWidth ?? true, shouldCancel }) };
}

/* ------------------------------------------------------------------ runners */

export interface EnsembleRunOptions {
  /** Polled between and during draws; true cancels (the result keeps the draws done, status 'cancelled'). */
  shouldCancel?: () => boolean;
  /** Fraction of draws done and a short label. */
  onProgress?: (fraction: number, stage: string) => void;
}

/** Runs the ensemble in this thread (web job workers, tests). Same numbers as the pool for the same seed. */
export function runEnsemble(scenario: Scenario, opts: EnsembleRunOptions = {}): UncertaintyResult {
  const started = performance.now();
  const plan = planEnsemble(scenario);
  const outcomes: DrawOutcome[] = [];
  let status: 'completed' | 'cancelled' = 'completed';
  for (let i = 0; i < plan.draws; i++) {
    if (opts.shouldCancel?.()) {
      status = 'cancelled';
      break;
    }
    let cancelledInside = false;
    const d = evaluateDraw(scenario, plan, i, () => (cancelledInside = opts.shouldCancel?.() ?? false));
    if (cancelledInside) {
      status = 'cancelled';
      break;
    }
    outcomes.push(d);
    opts.onProgress?.((i + 1) / plan.draws, `ensemble draw ${i + 1}/${plan.draws}`);
  }
  return summariseEnsemble(scenario, plan, outcomes, { status, threads: 1, wallMs: performance.now() - started });
}
