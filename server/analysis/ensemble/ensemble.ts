/**
 * Ensemble over uncertain parameters: Latin hypercube draws of every distribution in a scenario, one
 * evaluation per draw (baseline and each barrier option), and the summary in probabilities with Monte
 * Carlo standard errors and a partial-rank-correlation sensitivity ranking.
 *
 * Reproducibility: draw i depends only on (scenario, seed, i). The design is built from the seed's child
 * stream 0; nothing else is random. So a given seed gives identical results whether the draws run in this
 * thread or on a worker pool of any size (see ensemble-pool.ts).
 */
import { FIELDS, inRange, type FieldSpec } from '../../model/fields.ts';
import { centralValue, listUncertain, quantile, type Distribution } from '../../model/quantity.ts';
import { pointScenario, type PointScenario, type Scenario } from '../../model/scenario.ts';
import { formatPath } from '../../model/errors.ts';
import { latinHypercube, makeRng } from '../../numerics/rng.ts';
import { discretise } from '../../problem/discretise.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { coarsenedProblem } from '../../problem/resolution.ts';
import { resolveDraw } from '../../problem/resolve.ts';
import { runLayout } from '../run/simulate.ts';
import { DEFAULT_TOLERANCE_M, analyseBaseline, analyseOption, criticalWidth, mergedResolution } from '../verdict/barrier.ts';
import { CrossingWatch, barrierGeometry as crossingGeometry, crossingProbeKm, establishedLevels, isBeyond } from '../run/barrier-run.ts';
import { ArrivalTracker } from '../run/trackers.ts';
import { BypassTracker, bandWidth, barrierGeometry, effectiveRate, makeSurvivalKernel, sourceWeights } from '../bypass/bypass.ts';
import { partialRankCorrelation } from '../sensitivity/sensitivity.ts';
import type {
  OptionUncertainty,
  ProbabilityEstimate,
  QuantileSummary,
  SensitivityResult,
  SiteUncertainty,
  UncertainParameter,
  UncertaintyResult,
} from '../result.ts';

/* ------------------------------------------------------------------ parameters and draws */

/** Field spec of a scenario path whose last key names the field (growth.rate → growthRate, kernel.meanKm → transportMeanKm). */
const FIELD_OF_KEY: Record<string, FieldSpec> = {
  rate: FIELDS.growthRate,
  meanKm: FIELDS.transportMeanKm,
  ratePerKm2Year: FIELDS.transportRate,
};

/** The field spec (range, label, unit) of an uncertain entry's path. */
export function fieldOfPath(path: readonly (string | number)[]): FieldSpec {
  const key = String(path[path.length - 1]);
  const spec = FIELD_OF_KEY[key] ?? (FIELDS as Record<string, FieldSpec>)[key];
  if (!spec) throw new Error(`no field spec for uncertain parameter ${formatPath(path)}`);
  return spec;
}

/** Label of a parameter for tables and sentences (segments name their stretch). */
export function parameterLabel(scenario: Scenario, path: readonly (string | number)[]): string {
  const spec = fieldOfPath(path);
  const lower = (t: string): string => (t.startsWith('Allee') ? t : t.charAt(0).toLowerCase() + t.slice(1));
  if (path[0] === 'transect' && path[1] === 'segments' && typeof path[2] === 'number') {
    const seg = scenario.transect.segments[path[2]];
    return `${lower(spec.label)} (${seg?.name ? `"${seg.name}"` : `segment ${path[2] + 1}`})`;
  }
  return lower(spec.label);
}

/**
 * Moves a drawn value into the field's allowed range. Only log-normal tails can leave it (uniform and
 * triangular draws lie between validated bounds); an exclusive bound is approached to within 1e-9 relative.
 */
export function clipToField(spec: FieldSpec, v: number): number {
  if (inRange(spec, v)) return v;
  const eps = 1e-9;
  if (v < spec.min || (spec.minExclusive && v <= spec.min)) return spec.minExclusive ? spec.min + eps * Math.max(1, Math.abs(spec.min)) : spec.min;
  return spec.maxExclusive ? spec.max - eps * Math.max(1, Math.abs(spec.max)) : spec.max;
}

export interface PlannedParameter {
  path: (string | number)[];
  pathText: string;
  spec: FieldSpec;
  distribution: Distribution;
}

/** The draws of an ensemble: parameters (stable depth-first order) and the unit design (row-major draws × parameters). */
export interface EnsemblePlan {
  parameters: PlannedParameter[];
  draws: number;
  seed: number;
  /** Latin hypercube on (0,1)^k, draws × k, row-major. */
  unit: Float64Array;
}

/** Uncertain parameters of a scenario (every distribution, in stable order). */
export function uncertainParameters(scenario: Scenario): PlannedParameter[] {
  return listUncertain(scenario).map((e) => ({ path: e.path, pathText: formatPath(e.path), spec: fieldOfPath(e.path), distribution: e.distribution }));
}

/**
 * Plans the ensemble. Without distributions the ensemble is one draw (the central values), whatever
 * `draws` says: repeating an identical run adds nothing.
 */
export function planEnsemble(scenario: Scenario): EnsemblePlan {
  const u = scenario.uncertainty ?? { draws: 1000, seed: 1 };
  const parameters = uncertainParameters(scenario);
  const draws = parameters.length === 0 ? 1 : u.draws;
  const unit = latinHypercube(draws, parameters.length, makeRng(u.seed).child(0));
  return { parameters, draws, seed: u.seed, unit };
}

/** Parameter values of draw i (clipped into range) and which of them were clipped. */
export function drawValues(plan: EnsemblePlan, i: number): { values: number[]; clipped: boolean[] } {
  const k = plan.parameters.length;
  const values: number[] = [];
  const clipped: boolean[] = [];
  for (let j = 0; j < k; j++) {
    const p = plan.parameters[j];
    const raw = quantile(p.distribution, plan.unit[i * k + j]);
    const v = clipToField(p.spec, raw);
    values.push(v);
    clipped.push(v !== raw);
  }
  return { values, clipped };
}

/**
 * Draw i: its point scenario (resolve.ts) and the problem it runs, with the resolution coarsened by the
 * ensemble's `resolutionFactor` (a variant of the draw's problem; the scenario itself is not rewritten).
 */
export function drawScenario(scenario: Scenario, plan: EnsemblePlan, i: number): { point: PointScenario; problem: Problem; values: number[]; clipped: boolean[] } {
  const { values, clipped } = drawValues(plan, i);
  const point = resolveDraw(scenario, plan.parameters, values);
  return { point, problem: coarsened(point, scenario.uncertainty?.resolutionFactor ?? 1), values, clipped };
}

/** The problem of a point scenario with cells and step `factor` times the automatic choice (see coarsenedProblem). */
export function coarsened(s: PointScenario | Problem, factor: number): Problem {
  return coarsenedProblem(asProblem(s), factor);
}

/* ------------------------------------------------------------------ one draw */

/** What one evaluation of a point scenario yields for the ensemble (plain data: crosses worker threads). */
export interface PointOutcome {
  /** Baseline arrival per site [yr]; null: not within the horizon. */
  baselineArrivals: (number | null)[];
  options: {
    /** Year the breeding front got past the clearing (barrier analysis); null: not within the horizon. */
    crossingYears: number | null;
    /** Arrival per site with the option [yr]; null: not within the horizon, or held (front verified pinned). */
    arrivals: (number | null)[];
    /** Front verified pinned (holds indefinitely under the model). */
    pinned: boolean;
    /**
     * Critical width [m]: the narrowest width verified to pin the front (upper end of the bisection bracket);
     * Infinity: no finite width pins it (no strong Allee effect, or none up to the widest the transect allows);
     * null: not computed (switched off, or no front approached the clearing in the baseline and no phase-plane value).
     */
    criticalWidthM: number | null;
    /** Expected established introductions beyond the barrier up to the crossing or the horizon; null without transport. */
    bypassLambda: number | null;
  }[];
}

export interface DrawOutcome extends PointOutcome {
  index: number;
  values: number[];
  clipped: boolean[];
}

/** Critical-width tolerance for ensemble draws [m]: the scenario's, or 2 % of the option width if larger (the spread over draws is far wider). */
export function drawToleranceM(s: PointScenario, widthM: number): number {
  return Math.max(s.barrier?.toleranceM ?? DEFAULT_TOLERANCE_M, 0.02 * widthM);
}

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
    const geometry = crossingGeometry(s, o);
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
        const out = runLayout({ scenario: p, pieces, resolution, problem, record: false, shouldCancel, observers: [watch, siteArrivals, { handle: done }] });
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

/* ------------------------------------------------------------------ summaries */

/** Standard normal quantile for a two-sided 95 % interval. */
const Z95 = 1.959963984540054;

/**
 * Wilson score interval for a binomial proportion (Wilson 1927, J. Am. Stat. Assoc. 22:209–212): unlike
 * p ± 1.96·√(p(1−p)/n) it does not collapse to a point when every draw agrees (12 of 12 holding gives
 * 0.758–1, not 1–1).
 */
export function wilsonInterval(successes: number, n: number, z = Z95): [number, number] {
  if (!(n > 0)) return [NaN, NaN];
  const p = successes / n;
  const z2n = (z * z) / n;
  const centre = (p + z2n / 2) / (1 + z2n);
  const half = (z / (1 + z2n)) * Math.sqrt((p * (1 - p)) / n + (z * z) / (4 * n * n));
  return [Math.max(0, centre - half), Math.min(1, centre + half)];
}

/** Probability with its Monte Carlo standard error √(p(1−p)/n) and its 95 % Wilson interval. */
export function probability(successes: number, n: number): ProbabilityEstimate {
  const p = n > 0 ? successes / n : NaN;
  return { p, standardError: n > 0 ? Math.sqrt((p * (1 - p)) / n) : NaN, n, interval95: wilsonInterval(successes, n) };
}

/**
 * Sampling uncertainty used to decide whether there are enough draws: the standard error, or a quarter of the
 * Wilson interval's width when that is larger (it is when every draw agrees and the standard error is 0).
 */
export function effectiveStandardError(e: ProbabilityEstimate): number {
  const w = e.interval95 ? (e.interval95[1] - e.interval95[0]) / (2 * Z95) : 0;
  return Math.max(Number.isFinite(e.standardError) ? e.standardError : 0, Number.isFinite(w) ? w : 0);
}

/** Mean of per-draw probabilities with the standard error of the mean (sample standard deviation / √n). */
export function meanProbability(values: readonly number[]): ProbabilityEstimate {
  const n = values.length;
  if (n === 0) return { p: NaN, standardError: NaN, n: 0 };
  const m = values.reduce((a, b) => a + b, 0) / n;
  const v = n > 1 ? values.reduce((a, b) => a + (b - m) * (b - m), 0) / (n - 1) : 0;
  return { p: m, standardError: Math.sqrt(v / n), n };
}

/** Quantile with linear interpolation between order statistics (numpy's default, "type 7"); +∞ propagates. */
export function sortedQuantile(sorted: readonly number[], q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  if (sorted[hi] === Infinity) return h === lo && sorted[lo] !== Infinity ? sorted[lo] : Infinity;
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/**
 * Quantile summary of an outcome where +∞ stands for "beyond the horizon". The median's standard error
 * comes from the distribution-free 95 % order-statistic interval (ranks n/2 ± 0.98√n), divided by 2 × 1.96.
 */
export function summariseQuantiles(values: readonly number[]): QuantileSummary {
  const sorted = [...values].sort((a, b) => a - b);
  const finite = sorted.filter((x) => Number.isFinite(x));
  const n = sorted.length;
  let medianSe: number | null = null;
  if (n >= 10) {
    const lo = Math.max(0, Math.floor(n / 2 - 0.98 * Math.sqrt(n)));
    const hi = Math.min(n - 1, Math.ceil(n / 2 + 0.98 * Math.sqrt(n)));
    const w = sorted[hi] - sorted[lo];
    medianSe = Number.isFinite(w) ? w / (2 * 1.96) : null;
  }
  return {
    p05: finiteOrNull(sortedQuantile(sorted, 0.05)),
    median: finiteOrNull(sortedQuantile(sorted, 0.5)),
    p95: finiteOrNull(sortedQuantile(sorted, 0.95)),
    mean: finite.length ? finite.reduce((a, b) => a + b, 0) / finite.length : null,
    n: finite.length,
    beyondHorizon: n - finite.length,
    medianStandardError: medianSe,
  };
}

const signed = (x: number): string => `${x >= 0 ? '+' : '−'}${Math.abs(x).toFixed(2)}`;

/** Sensitivity ranking of one outcome over the draws, with its sentence. */
export function sensitivityRanking(
  plan: EnsemblePlan,
  labels: readonly string[],
  values: readonly (readonly number[])[],
  outcome: readonly number[],
  what: { outcome: string; outcomeKey: string; verb: string },
): SensitivityResult | null {
  const k = plan.parameters.length;
  if (k === 0 || outcome.length < k + 3) return null;
  const columns = plan.parameters.map((_, j) => values.map((v) => v[j]));
  const r = partialRankCorrelation(columns, outcome);
  if (!r) return null;
  const entries = plan.parameters
    .map((p, j) => ({ path: p.pathText, label: labels[j], prcc: r.prcc[j], significant: r.significant[j] }))
    .sort((a, b) => Math.abs(b.prcc) - Math.abs(a.prcc));
  const sig = entries.filter((e) => e.significant);
  let sentence: string;
  if (sig.length === 0) sentence = `No uncertain parameter stands out: none is significantly linked to the ${what.outcome} at the 5 % level.`;
  else {
    const first = `${what.verb} mostly on ${sig[0].label} (partial rank correlation ${signed(sig[0].prcc)})`;
    const rest = sig.slice(1, 3).map((e) => `${e.label} (${signed(e.prcc)})`);
    sentence = `The ${what.outcome} ${first}${rest.length ? `, then on ${rest.join(' and ')}` : ''}.`;
  }
  return { outcome: what.outcome, outcomeKey: what.outcomeKey, method: 'partial rank correlation (PRCC) over the Latin hypercube draws', entries, sentence };
}

const pct = (p: number): string => `${Math.round(100 * p)} %`;

/** Summarises the draws (in index order) into the result document's uncertainty section. */
export function summariseEnsemble(
  scenario: Scenario,
  plan: EnsemblePlan,
  outcomes: readonly DrawOutcome[],
  info: { status: 'completed' | 'cancelled'; threads: number; wallMs: number },
): UncertaintyResult {
  const s = pointScenario(scenario);
  const n = outcomes.length;
  const horizon = s.horizonYears;
  const target = scenario.uncertainty?.targetStandardError ?? 0.02;
  const labels = plan.parameters.map((p) => parameterLabel(scenario, p.path));
  const values = outcomes.map((o) => o.values);
  const inf = (x: number | null): number => (x === null ? Infinity : x);
  const parameters: UncertainParameter[] = plan.parameters.map((p, j) => ({
    path: p.pathText,
    label: labels[j],
    unit: p.spec.unit,
    distribution: p.distribution,
    centralValue: centralValue(p.distribution),
    clippedDraws: outcomes.filter((o) => o.clipped[j]).length,
  }));
  const baselineSites = s.sites.map((site, k) => {
    const arr = outcomes.map((o) => inf(o.baselineArrivals[k]));
    return {
      name: site.name,
      atKm: site.atKm,
      reachedWithinHorizon: probability(arr.filter(Number.isFinite).length, n),
      arrivalYears: summariseQuantiles(arr),
    };
  });
  const probs: ProbabilityEstimate[] = [];
  const options: OptionUncertainty[] = (s.barrier?.options ?? []).map((o, m) => {
    const per = outcomes.map((d) => d.options[m]);
    const holds = probability(per.filter((x) => x.crossingYears === null).length, n);
    const pinned = n > 0 ? probability(per.filter((x) => x.pinned).length, n) : null;
    const withTransport = s.transport ? meanProbability(per.map((x) => (x.crossingYears === null ? Math.exp(-(x.bypassLambda ?? 0)) : 0))) : null;
    probs.push(holds, ...(pinned ? [pinned] : []), ...(withTransport ? [withTransport] : []));
    const sites: SiteUncertainty[] = s.sites.map((site, k) => {
      const arrivals = per.map((x) => inf(x.arrivals[k]));
      const delays: number[] = [];
      outcomes.forEach((d, i) => {
        const b = d.baselineArrivals[k];
        if (b !== null) delays.push(arrivals[i] - b);
      });
      const reached = probability(arrivals.filter(Number.isFinite).length, n);
      probs.push(reached);
      return { name: site.name, atKm: site.atKm, reachedWithinHorizon: reached, arrivalYears: summariseQuantiles(arrivals), delayYears: summariseQuantiles(delays) };
    });
    const cw = per.map((x) => x.criticalWidthM).filter((x): x is number => x !== null);
    const cwAny = cw.length > 0 && cw.some(Number.isFinite);
    const cwSummary = cw.length > 0 ? summariseQuantiles(cw) : null;
    const sortedCw = [...cw].sort((a, b) => a - b);
    const missing = n - cw.length;
    const criticalWidth = {
      computed: cwAny,
      note: cwAny
        ? `Critical width per draw (narrowest width verified to pin the front, bisection to ${Math.round(drawToleranceM(s, o.widthM))} m); a width W holds in a draw when it is at least that draw’s critical width, so the 90 % and 95 % quantiles are the widths that hold with those probabilities. ` +
          `Draws where no finite width pins the front count as beyond every width.` +
          (missing ? ` ${missing} draw(s) without a value (no front approached the clearing) are left out.` : '')
        : cw.length > 0
          ? 'No finite clearing pins the front in any draw (no strong Allee effect, or none within the transect): widths only delay.'
          : 'Per-draw critical width not computed (switched off in uncertainty.criticalWidth, or no front approached the clearing).',
      widthM: cwSummary,
      holds90M: cwAny ? finiteOrNull(sortedQuantile(sortedCw, 0.9)) : null,
      holds95M: cwAny ? finiteOrNull(sortedQuantile(sortedCw, 0.95)) : null,
    };
    const cwKnown = cwAny && missing === 0;
    const outcomeForRanking = cwKnown
      ? { y: per.map((x) => x.criticalWidthM as number), what: { outcome: 'critical width', outcomeKey: 'criticalWidthM', verb: 'depends' } }
      : { y: per.map((x) => inf(x.crossingYears)), what: { outcome: 'year the front crosses the clearing', outcomeKey: 'crossingYears', verb: 'depends' } };
    let sensitivity = sensitivityRanking(plan, labels, values, outcomeForRanking.y, outcomeForRanking.what);
    if (!sensitivity && s.transport) {
      // The natural outcome does not vary (e.g. held in every draw): rank what drives the transport risk.
      sensitivity = sensitivityRanking(
        plan,
        labels,
        values,
        per.map((x) => x.bypassLambda ?? 0),
        { outcome: 'expected number of established introductions beyond the clearing', outcomeKey: 'bypassExpected', verb: 'depends' },
      );
    }
    const sentences: string[] = [];
    sentences.push(
      `Option "${o.name}" (${o.widthM} m): the front does not get past the clearing within ${horizon} years in ${pct(holds.p)} of ${n} draws` +
        (n > 1
          ? holds.standardError > 0
            ? ` (± ${(100 * holds.standardError).toFixed(1)} percentage points, one standard error).`
            : ` (every draw agrees; 95 % interval ${(100 * holds.interval95![0]).toFixed(1)}–${(100 * holds.interval95![1]).toFixed(1)} %).`
          : '.'),
    );
    if (pinned) sentences.push(`It is verified to hold indefinitely (front pinned) in ${pct(pinned.p)} of draws.`);
    if (criticalWidth.computed && criticalWidth.holds90M !== null) {
      sentences.push(`A clearing of ${Math.round(criticalWidth.holds90M)} m holds in 90 % of draws${criticalWidth.holds95M !== null ? `, ${Math.round(criticalWidth.holds95M)} m in 95 %` : ''}.`);
    }
    if (withTransport) sentences.push(`Counting human-carried introductions as well, the barrier holds in ${pct(withTransport.p)} of draws.`);
    if (sensitivity) sentences.push(sensitivity.sentence);
    return {
      name: o.name,
      widthM: o.widthM,
      holdsWithinHorizon: holds,
      pinned,
      crossingYears: summariseQuantiles(per.map((x) => inf(x.crossingYears))),
      holdsIncludingTransport: withTransport,
      sites,
      criticalWidth,
      sensitivity,
      sentences,
    };
  });
  for (const b of baselineSites) probs.push(b.reachedWithinHorizon);
  const largest = probs.reduce((a, p) => Math.max(a, effectiveStandardError(p)), 0);
  const adequate = plan.parameters.length === 0 || largest <= target;
  const drawsSuggested = adequate ? n : Math.ceil(n * (largest / target) ** 2);
  const message =
    plan.parameters.length === 0
      ? 'The scenario has no parameter ranges, so one draw (the central values) is exact; there is no sampling error.'
      : info.status === 'cancelled'
        ? `Cancelled after ${n} of ${plan.draws} draws: the probabilities rest on fewer draws than asked for. Run again to finish.`
        : adequate
          ? `${n} draws give a largest standard error of ${largest.toFixed(3)}, within the target ${target}.`
          : `More draws needed: the largest standard error is ${largest.toFixed(3)}, above the target ${target}; about ${drawsSuggested} draws would reach it.`;
  return {
    method: 'latin-hypercube',
    draws: plan.draws,
    completed: n,
    status: info.status,
    seed: plan.seed,
    parameters,
    baseline: { sites: baselineSites },
    options,
    convergence: { targetStandardError: target, largestStandardError: largest, adequate: adequate && info.status === 'completed', drawsSuggested, message },
    threads: info.threads,
    wallMs: Math.round(info.wallMs),
  };
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
