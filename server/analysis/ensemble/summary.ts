/**
 * The ensemble's summary: probabilities with Monte Carlo standard errors and Wilson intervals, quantiles
 * with "beyond the horizon", the PRCC sensitivity ranking and the sentences of the uncertainty section.
 */
import { centralValue } from '../../model/quantity.ts';
import { pointScenario, type Scenario } from '../../model/scenario.ts';
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
import { percent } from '../words.ts';
import { drawToleranceM, parameterLabel, type DrawOutcome, type EnsemblePlan } from './plan.ts';

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

const pct = percent;
const inf = (x: number | null): number => (x === null ? Infinity : x);

/** What every option's summary shares: the draws, the plan and the labels of its parameters. */
interface SummaryContext {
  s: ReturnType<typeof pointScenario>;
  plan: EnsemblePlan;
  outcomes: readonly DrawOutcome[];
  labels: string[];
  values: number[][];
  /** Every probability estimate, in order (the largest standard error decides whether there are enough draws). */
  probs: ProbabilityEstimate[];
}

/** The per-draw critical widths of one option, as quantiles and the widths that hold in 90 % and 95 % of draws. */
function criticalWidthSummary(s: SummaryContext['s'], o: { widthM: number }, per: readonly DrawOutcome['options'][number][], n: number): OptionUncertainty['criticalWidth'] {
  const cw = per.map((x) => x.criticalWidthM).filter((x): x is number => x !== null);
  const cwAny = cw.length > 0 && cw.some(Number.isFinite);
  const sortedCw = [...cw].sort((a, b) => a - b);
  const missing = n - cw.length;
  return {
    computed: cwAny,
    note: cwAny
      ? `Critical width per draw (narrowest width verified to pin the front, bisection to ${Math.round(drawToleranceM(s, o.widthM))} m); a width W holds in a draw when it is at least that draw’s critical width, so the 90 % and 95 % quantiles are the widths that hold with those probabilities. ` +
        `Draws where no finite width pins the front count as beyond every width.` +
        (missing ? ` ${missing} draw(s) without a value (no front approached the clearing) are left out.` : '')
      : cw.length > 0
        ? 'No finite clearing pins the front in any draw (no strong Allee effect, or none within the transect): widths only delay.'
        : 'Per-draw critical width not computed (switched off in uncertainty.criticalWidth, or no front approached the clearing).',
    widthM: cw.length > 0 ? summariseQuantiles(cw) : null,
    holds90M: cwAny ? finiteOrNull(sortedQuantile(sortedCw, 0.9)) : null,
    holds95M: cwAny ? finiteOrNull(sortedQuantile(sortedCw, 0.95)) : null,
  };
}

/**
 * The ranking of what drives the option's outcome: its critical width when every draw has one, else the
 * year of crossing; the transport risk when neither varies.
 */
function optionSensitivity(c: SummaryContext, per: readonly DrawOutcome['options'][number][], cwKnown: boolean): SensitivityResult | null {
  const ranked = cwKnown
    ? { y: per.map((x) => x.criticalWidthM as number), what: { outcome: 'critical width', outcomeKey: 'criticalWidthM', verb: 'depends' } }
    : { y: per.map((x) => inf(x.crossingYears)), what: { outcome: 'year the front crosses the clearing', outcomeKey: 'crossingYears', verb: 'depends' } };
  const sensitivity = sensitivityRanking(c.plan, c.labels, c.values, ranked.y, ranked.what);
  if (sensitivity || !c.s.transport) return sensitivity;
  // The natural outcome does not vary (e.g. held in every draw): rank what drives the transport risk.
  return sensitivityRanking(
    c.plan,
    c.labels,
    c.values,
    per.map((x) => x.bypassLambda ?? 0),
    { outcome: 'expected number of established introductions beyond the clearing', outcomeKey: 'bypassExpected', verb: 'depends' },
  );
}

/** The option's sentences of the uncertainty section, answer first. */
function optionSentences(
  o: { name: string; widthM: number },
  horizon: number,
  n: number,
  u: Pick<OptionUncertainty, 'holdsWithinHorizon' | 'pinned' | 'criticalWidth' | 'holdsIncludingTransport' | 'sensitivity'>,
): string[] {
  const holds = u.holdsWithinHorizon;
  const sentences = [
    `Option "${o.name}" (${o.widthM} m): the front does not get past the clearing within ${horizon} years in ${pct(holds.p)} of ${n} draws` +
      (n > 1
        ? holds.standardError > 0
          ? ` (± ${(100 * holds.standardError).toFixed(1)} percentage points, one standard error).`
          : ` (every draw agrees; 95 % interval ${(100 * holds.interval95![0]).toFixed(1)}–${(100 * holds.interval95![1]).toFixed(1)} %).`
        : '.'),
  ];
  if (u.pinned) sentences.push(`It holds for good (checked: the front stops and stays) in ${pct(u.pinned.p)} of draws.`);
  const cw = u.criticalWidth;
  if (cw.computed && cw.holds90M !== null) {
    sentences.push(`A clearing of ${Math.round(cw.holds90M)} m holds in 90 % of draws${cw.holds95M !== null ? `, ${Math.round(cw.holds95M)} m in 95 %` : ''}.`);
  }
  if (u.holdsIncludingTransport) sentences.push(`Counting human-carried introductions as well, the barrier holds in ${pct(u.holdsIncludingTransport.p)} of draws.`);
  if (u.sensitivity) sentences.push(u.sensitivity.sentence);
  return sentences;
}

/** One option over the draws; its probability estimates are added to c.probs in the document's order. */
function optionUncertainty(c: SummaryContext, o: { name: string; widthM: number }, m: number): OptionUncertainty {
  const { s, outcomes, probs } = c;
  const n = outcomes.length;
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
  const criticalWidth = criticalWidthSummary(s, o, per, n);
  const cwKnown = criticalWidth.computed && per.every((x) => x.criticalWidthM !== null);
  const sensitivity = optionSensitivity(c, per, cwKnown);
  const u = { holdsWithinHorizon: holds, pinned, criticalWidth, holdsIncludingTransport: withTransport, sensitivity };
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
    sentences: optionSentences(o, s.horizonYears, n, u),
  };
}

/** Whether the draws are enough: the largest standard error against the target, in words. */
function convergenceOf(plan: EnsemblePlan, probs: readonly ProbabilityEstimate[], n: number, target: number, status: 'completed' | 'cancelled'): UncertaintyResult['convergence'] {
  const largest = probs.reduce((a, p) => Math.max(a, effectiveStandardError(p)), 0);
  const adequate = plan.parameters.length === 0 || largest <= target;
  const drawsSuggested = adequate ? n : Math.ceil(n * (largest / target) ** 2);
  const message =
    plan.parameters.length === 0
      ? 'The scenario has no parameter ranges, so one draw (the central values) is exact; there is no sampling error.'
      : status === 'cancelled'
        ? `Cancelled after ${n} of ${plan.draws} draws: the probabilities rest on fewer draws than asked for. Run again to finish.`
        : adequate
          ? `${n} draws give a largest standard error of ${largest.toFixed(3)}, within the target ${target}.`
          : `More draws needed: the largest standard error is ${largest.toFixed(3)}, above the target ${target}; about ${drawsSuggested} draws would reach it.`;
  return { targetStandardError: target, largestStandardError: largest, adequate: adequate && status === 'completed', drawsSuggested, message };
}

/** Summarises the draws (in index order) into the result document's uncertainty section. */
export function summariseEnsemble(
  scenario: Scenario,
  plan: EnsemblePlan,
  outcomes: readonly DrawOutcome[],
  info: { status: 'completed' | 'cancelled'; threads: number; wallMs: number },
): UncertaintyResult {
  const s = pointScenario(scenario);
  const n = outcomes.length;
  const labels = plan.parameters.map((p) => parameterLabel(scenario, p.path));
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
  const c: SummaryContext = { s, plan, outcomes, labels, values: outcomes.map((o) => o.values), probs: [] };
  const options = (s.barrier?.options ?? []).map((o, m) => optionUncertainty(c, o, m));
  for (const b of baselineSites) c.probs.push(b.reachedWithinHorizon);
  return {
    method: 'latin-hypercube',
    draws: plan.draws,
    completed: n,
    status: info.status,
    seed: plan.seed,
    parameters,
    baseline: { sites: baselineSites },
    options,
    convergence: convergenceOf(plan, c.probs, n, scenario.uncertainty?.targetStandardError ?? 0.02, info.status),
    threads: info.threads,
    wallMs: Math.round(info.wallMs),
  };
}
