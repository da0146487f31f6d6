/**
 * The result document: what one evaluation produces, for the CLI (--json), the API, the web pages and
 * the briefing. Plain JSON (numbers, strings, arrays); times in years, positions in km, widths in m.
 * Documented field by field in the README ("Result document").
 * Longer than 400 lines on purpose: the whole document's type, in one place, is what readers and the README follow.
 */
import type { Habitat } from '../model/scenario.ts';

/** Version of this document's layout; bump when a field changes meaning. */
export const RESULT_VERSION = 1;

export interface PieceSummary {
  fromKm: number;
  toKm: number;
  habitat: Habitat;
  stocking: number;
  stemsPerHa: number;
  barrier: boolean;
}

export interface SiteArrival {
  name: string;
  atKm: number;
  /** First year the density at the site reaches the detection level; null if not within the run. */
  arrivalYears: number | null;
}

export interface SpreadRateSummary {
  direction: 'right' | 'left';
  /** Measured speed [km/yr]; null when the front did not travel far enough inside the transect to fit. */
  kmPerYear: number | null;
  fromYears: number | null;
  toYears: number | null;
  rSquared: number | null;
}

/** Series and profiles of one simulated layout (baseline or an option). */
export interface RunResult {
  layout: PieceSummary[];
  /** Front positions over time (decimated to at most ~400 samples). NaN is written as null. */
  series: {
    timesYears: number[];
    /** Farthest point to the right with density ≥ detection level [km]; null when none. */
    rightFrontKm: (number | null)[];
    leftFrontKm: (number | null)[];
    /** ∫u dx [km × relative density]. */
    totalInsects: number[];
  };
  /** Profiles at a few times (first, evenly spaced, last). Positions shared by all snapshots. */
  profiles: { xKm: number[]; snapshots: { timeYears: number; density: number[]; host: number[] }[] };
  /** Space–time density map: rows = times, columns = positions. */
  spaceTime: { xKm: number[]; timesYears: number[]; density: number[][] };
  arrivals: SiteArrival[];
  spreadRates: SpreadRateSummary[];
  host: {
    /** Host fraction left at the end, stem-weighted over host forest (1 = nothing killed). */
    remainingFraction: number;
    /** Host stems killed per km of front width [trees/km]. */
    stemsKilledPerKm: number;
  };
  /** Final time reached [yr] (the horizon unless the run stopped early). */
  endYears: number;
  numerics: {
    status: 'completed' | 'stopped' | 'cancelled';
    message: string;
    nCells: number;
    cellKmMin: number;
    cellKmMax: number;
    stepYears: number;
    autoCell: boolean;
    autoStep: boolean;
    /** Accepted steps. */
    steps: number;
    /** Steps the step controller rejected and redid (always 0 with fixed steps). */
    rejectedSteps: number;
    /**
     * How step sizes were chosen: 'fixed' (the resolution's stepYears, the last step shortened to the end) or
     * 'adaptive' (error-controlled NDF steps at `tolerance`; stepYears is then the output interval).
     */
    stepControl: 'fixed' | 'adaptive';
    /** Relative tolerance of the adaptive steps (adaptive only). */
    tolerance?: number;
    /** Jacobian evaluations and factorisations of the adaptive integrator (adaptive only). */
    jacobianEvaluations?: number;
    factorisations?: number;
    fallbackSteps: number;
    reactionSubsteps: number;
    wallMs: number;
  };
}

export interface ResultDocument {
  resultVersion: number;
  tool: { name: string; version: string };
  /** SHA-256 of the canonical scenario JSON (see model/canonical.ts). */
  scenarioFingerprint: string;
  /** ISO date-time of the run. */
  runAt: string;
  title: string;
  description: string;
  region?: string;
  pest: { name: string; illustrative: boolean };
  horizonYears: number;
  detectionLevel: number;
  /** The current infestation as given in the scenario [km]; density relative to capacity. */
  infestation?: { fromKm: number; toKm: number; density: number };
  /** Model facts that frame the reading of results. */
  model: {
    growthForm: string;
    /** Per-capita growth at low density in intact forest [1/yr]; negative = strong Allee effect. */
    lowDensityRate: number;
    alleeThreshold: number | null;
    /** 2√(D r0) in intact host forest [km/yr]; 0 without growth at low density. */
    linearSpeedKmPerYear: number;
    hostDepletion: boolean;
  };
  baseline: RunResult;
  /** Barrier options, in scenario order (empty when the scenario has none). */
  options: OptionResult[];
  /** Periodic thinning patterns, when the scenario asks for them. */
  mosaics?: MosaicResult[];
  /** Ensemble over uncertain parameters, when the scenario asks for one. Filled by the uncertainty analysis. */
  uncertainty?: UncertaintyResult;
  /** Human-carried bypass risk, when the scenario describes transport. Filled by the bypass analysis. */
  bypass?: BypassResult;
  /** One recommended minimum width for the scenario, with its basis (analysis/recommended-width.ts). */
  recommendedWidth?: RecommendedWidth;
  /** Plain-language limits and cautions; every output shows them. */
  cautions: string[];
}

/**
 * Verdict words. `holds`: front pinned at the barrier, verified as a stable steady state (or pest dead
 * near the barrier); `marginal`: width within the critical-width bracket's uncertainty; `not-crossed`:
 * not crossed within the horizon but not shown to be pinned; `delays`: arrives later than baseline;
 * `speeds-up`: arrives earlier than baseline; `no-change`: arrival differs by less than one time step;
 * `not-reached`: neither baseline nor option reaches the place within the horizon.
 */
export type VerdictKind = 'holds' | 'marginal' | 'not-crossed' | 'delays' | 'speeds-up' | 'no-change' | 'not-reached';

export interface SiteVerdict {
  name: string;
  atKm: number;
  /** True when the barrier lies between the infestation and the site. */
  beyondBarrier: boolean;
  baselineArrivalYears: number | null;
  optionArrivalYears: number | null;
  /**
   * Arrival in a run extended past the horizon (only when the option's run did not reach the site in time);
   * null when not projected or not reached in the extension either.
   */
  projectedArrivalYears?: number | null;
  /** option − baseline arrival [yr] when both arrive; positive = time bought. */
  delayYears: number | null;
  kind: VerdictKind;
  /** One plain sentence, e.g. "Arrives 6.2 years later than without the clearing (year 24.1 instead of 17.9)." */
  sentence: string;
  /** Option cost divided by years of delay at this site; null without a cost or without a positive delay. */
  costPerYearOfDelay: number | null;
}

export interface CriticalWidth {
  /** False for growth forms without a strong Allee effect: no finite clearing pins a front in this model. */
  applicable: boolean;
  /** Plain-language method or reason. */
  note: string;
  /** [largest width seen to let the front through, smallest width verified to pin it] [m]; null if not found. */
  bracketM: [number, number] | null;
  toleranceM: number;
  /** Full-model runs used by the bisection. */
  runs: number;
  /** Critical width from the first-integral (phase-plane) blocking criterion [m]; null where it does not apply. */
  phasePlaneM: number | null;
  /** True when this option's width lies inside the bracket (cannot be called either way). */
  marginal: boolean;
  /** For forms without a strong Allee effect: extra years of delay per 100 m of width at the first site beyond the barrier. */
  delayPer100mYears: number | null;
  /** Why the phase-plane value is missing, or what it assumes (e.g. hosts held at their present stocking). */
  phasePlaneNote?: string;
  /**
   * True when the pest kills its hosts but the phase-plane value holds them at their present stocking: it is
   * then a different model from the full runs (usually wider than the bracket) and must be labelled so.
   */
  phasePlaneAssumesIntactHosts?: boolean;
  /** The bracket's lower end repeated with half the time step; null when not run. */
  halfStepCheck?: { widthM: number; outcome: string } | null;
  /** Both bracket ends repeated on a computational window twice as large; agreed = same outcomes. */
  windowCheck?: { widthsM: number[]; agreed: boolean } | null;
}

export interface WidthDelayRow {
  widthM: number;
  /** Front verified pinned at this width. */
  pinned: boolean;
  /** Year the front passed the far edge of the clearing; null if not within the run. */
  crossingYears: number | null;
  /** Delay at each site (scenario order) [yr]; null where not defined (site not beyond, not reached, or the front verified pinned: held). */
  delayYearsBySite: (number | null)[];
}

export interface OptionResult {
  name: string;
  fromKm: number;
  widthM: number;
  cover: 'clearing' | 'non-host-forest';
  run: RunResult;
  verdict: { kind: VerdictKind; sentence: string; why: string };
  pinned: boolean;
  /** How "holds" was established (or why it was not). */
  pinning: { verified: boolean; method: string; detail: string };
  /** When the front passed the far edge of the clearing [yr], in the baseline and with the option; projected if extended. */
  crossingYears: { baseline: number | null; option: number | null; projected: number | null };
  sites: SiteVerdict[];
  criticalWidth: CriticalWidth;
  widthDelay: WidthDelayRow[];
  speeds: {
    baselineKmPerYear: number | null;
    /** Measured beyond the clearing with the option in place. */
    optionKmPerYear: number | null;
  };
  trees: { stemsRemoved: number; cost: number | null; costUnit: string | null };
}

/** Asymptotic speed in a periodic forest/gap pattern (strip thinning). */
export interface MosaicResult {
  name: string;
  forestM: number;
  gapM: number;
  cover: 'clearing' | 'non-host-forest';
  /** Principal eigenvalue at s = 0 [1/yr]; the pest persists in the pattern iff > 0. */
  lambda0: number;
  persists: boolean;
  /** c* = min λ(s)/s from the dispersion relation [km/yr]; null if the pest does not persist. */
  exactKmPerYear: number | null;
  /** 2√(D_eff r_eff) with residence-index weighting [km/yr]; null if r_eff ≤ 0. */
  homogenisedKmPerYear: number | null;
  /** Speed in intact host forest for comparison [km/yr]. */
  intactKmPerYear: number;
  /** Measured in a simulated long pattern [km/yr], when run. */
  measuredKmPerYear: number | null;
  kind: 'speeds-up' | 'slows' | 'stops';
  sentence: string;
  /** Dispersion curve for charts: decay rates s [1/km] and λ(s) [1/yr]. */
  curve: { s: number[]; lambda: number[] };
  /** Decay rate s* [1/km] of the front's leading edge at the minimum of λ(s)/s; null where not applicable. */
  decayRate?: number | null;
  /** What the homogenised estimate assumes (it is reported beside the exact value, not asserted equal). */
  homogenisedNote?: string;
  /** The measured speed was fitted with the Bramson log term (pulled fronts). */
  measuredLogCorrected?: boolean;
}

/* ---------------------------------------------------------------------------------------------------
 * Uncertainty (ensemble), sensitivity and human-carried bypass (issue 6). Documented in README.md,
 * "Result document". Probabilities are fractions in [0, 1].
 * ------------------------------------------------------------------------------------------------- */

/** A probability estimated from ensemble draws, with its Monte Carlo standard error. */
export interface ProbabilityEstimate {
  /** Estimated probability. */
  p: number;
  /**
   * Monte Carlo standard error √(p(1−p)/n) (the simple-random-sampling value; Latin hypercube draws are at
   * least as precise for outcomes monotone in each parameter, so this is conservative).
   */
  standardError: number;
  /** Draws the estimate rests on. */
  n: number;
  /** 95 % Wilson score interval [low, high] (counts only; absent for averaged probabilities). */
  interval95?: [number, number];
}

/**
 * Quantiles of an outcome over the draws. A null quantile means "beyond the horizon" (the event did not
 * happen within the run in that share of draws), so only a lower bound is known.
 */
export interface QuantileSummary {
  /** 5 % quantile. */
  p05: number | null;
  median: number | null;
  /** 95 % quantile. */
  p95: number | null;
  /** Mean over the draws where the outcome is defined and within the horizon; null if none. */
  mean: number | null;
  /** Draws with a defined value (within the horizon). */
  n: number;
  /** Draws where the event lay beyond the horizon (counted as +∞ in the quantiles). */
  beyondHorizon: number;
  /** Approximate standard error of the median from the order statistics (Monte Carlo error); null if not available. */
  medianStandardError: number | null;
}

/** One uncertain parameter of the scenario and how it was drawn. */
export interface UncertainParameter {
  /** Dotted path in the scenario, e.g. `pest.diffusionOpen`. */
  path: string;
  label: string;
  unit: string;
  /** The distribution as given in the scenario. */
  distribution: { dist: 'uniform'; min: number; max: number } | { dist: 'triangular'; min: number; mode: number; max: number } | { dist: 'lognormal'; median: number; spread: number };
  /** Value used by the single runs (the central value). */
  centralValue: number;
  /** Draws moved into the field's allowed range (log-normal tails beyond the range are clipped to its edge). */
  clippedDraws: number;
}

/** Partial rank correlation of one parameter with the ranked outcome. */
export interface SensitivityEntry {
  path: string;
  label: string;
  /** Partial rank correlation coefficient in [−1, 1]; positive: larger values of the parameter raise the outcome. */
  prcc: number;
  /** True when |PRCC| is significant at the 5 % level (t-test with n − 2 − (k − 1) degrees of freedom). */
  significant: boolean;
}

/** Which parameters drive an outcome, most influential first (chart-ready: bar per entry). */
export interface SensitivityResult {
  /** What was ranked, e.g. "critical width [m]" or "year the front crosses the clearing". */
  outcome: string;
  /** Key of the outcome: 'criticalWidthM' | 'crossingYears' | 'bypassExpected' (when the natural outcome does not vary). */
  outcomeKey: string;
  method: string;
  /** Sorted by |prcc|, largest first. */
  entries: SensitivityEntry[];
  /** One plain sentence, e.g. "The verdict depends mostly on movement in the open (PRCC +0.81), then on ...". */
  sentence: string;
}

/** Ensemble outcome at one protected site for one option. */
export interface SiteUncertainty {
  name: string;
  atKm: number;
  /** Probability the pest reaches the site within the horizon with the option in place. */
  reachedWithinHorizon: ProbabilityEstimate;
  /** Arrival year with the option [yr]. */
  arrivalYears: QuantileSummary;
  /** Delay against the baseline [yr] (option − baseline arrival), over draws where the baseline arrives. */
  delayYears: QuantileSummary;
}

/** Ensemble of the critical width of one option. */
export interface CriticalWidthUncertainty {
  /** False when not computed (growth form without a strong Allee effect, switched off, or the analysis is unavailable). */
  computed: boolean;
  note: string;
  /** Distribution of the per-draw critical width [m]; draws where no finite width pins the front count as beyond. */
  widthM: QuantileSummary | null;
  /** Width that holds in 90 % of draws [m] (90 % quantile of the critical width); null if beyond the search range. */
  holds90M: number | null;
  /** Width that holds in 95 % of draws [m]. */
  holds95M: number | null;
}

/** Ensemble results for one barrier option. */
export interface OptionUncertainty {
  name: string;
  widthM: number;
  /** Front not past the far edge of the clearing at the horizon. */
  holdsWithinHorizon: ProbabilityEstimate;
  /** Front verified pinned (holds indefinitely), from the barrier analysis of each draw; null only for an empty ensemble. */
  pinned: ProbabilityEstimate | null;
  /** Year the breeding front gets past the clearing [yr] (the barrier analysis's crossing, per draw). */
  crossingYears: QuantileSummary;
  /** Barrier holds against natural spread AND no established human-carried introduction beyond it by the horizon; null without transport. */
  holdsIncludingTransport: ProbabilityEstimate | null;
  sites: SiteUncertainty[];
  criticalWidth: CriticalWidthUncertainty;
  sensitivity: SensitivityResult | null;
  /** Plain sentences for the reader (verdict in probabilities, transport, more draws). */
  sentences: string[];
}

/** The ensemble over uncertain parameters. */
export interface UncertaintyResult {
  method: 'latin-hypercube';
  /** Draws asked for. */
  draws: number;
  /** Draws completed (fewer when cancelled). */
  completed: number;
  status: 'completed' | 'cancelled';
  seed: number;
  parameters: UncertainParameter[];
  /** Baseline arrival at each site. */
  baseline: { sites: { name: string; atKm: number; reachedWithinHorizon: ProbabilityEstimate; arrivalYears: QuantileSummary }[] };
  options: OptionUncertainty[];
  /**
   * Monte Carlo adequacy: largest probability standard error against the target. Where every draw agreed
   * (standard error 0) a quarter of the 95 % Wilson interval's width stands in for it, so a small ensemble
   * in which everything held still asks for more draws.
   */
  convergence: {
    targetStandardError: number;
    largestStandardError: number;
    adequate: boolean;
    /** Draws that would bring the largest standard error to the target (≥ the draws used). */
    drawsSuggested: number;
    message: string;
  };
  /** Worker threads used and wall time [ms] (does not change the numbers). */
  threads: number;
  wallMs: number;
  /** Where the draws ran, in words ("this machine, 2 worker threads", "2 queue workers"); absent: `threads` threads here. */
  ranOn?: string;
}

/** Human-carried bypass risk of one option (from the central-value run, and over the ensemble when there is one). */
export interface OptionBypass {
  name: string;
  widthM: number;
  /** Which side the barrier protects. */
  protectsSide: 'right' | 'left';
  /** Expected number of established introductions beyond the barrier by the horizon (Λ). */
  expectedEstablished: number;
  /** P(at least one established introduction beyond the barrier by the horizon) = 1 − e^(−Λ), central-value run. */
  probability: number;
  /** Same, by year: chart-ready curve (years 0…horizon). */
  curve: { timesYears: number[]; probability: number[] };
  /** Bypass probability with the clearing 100 m wider (shows how little width helps against transport). */
  probabilityIf100mWider: number;
  /** Ensemble mean of the bypass probability, when an ensemble ran. */
  ensemble: ProbabilityEstimate | null;
  /** P(barrier holds against natural spread) from the central-value run (1 or 0) or the ensemble. */
  holdsNatural: number;
  /** P(holds against natural spread and human transport). */
  holdsOverall: number;
  /** True when transport, not the width, decides whether the barrier holds. */
  transportDecides: boolean;
  sentence: string;
}

/** Human-carried bypass risk (stratified dispersal). */
export interface BypassResult {
  method: string;
  /** Inputs at their central values. */
  inputs: {
    ratePerKm2Year: number;
    kernel: { shape: 'exponential'; meanKm: number } | { shape: 'table'; points: { distanceKm: number; shareBeyond: number }[] };
    establishmentProbability: number;
    forwardShare: number;
    bandWidthKm: number;
  };
  options: OptionBypass[];
  /** The regulator's tool against transport, stated with every bypass result. */
  regulatorNote: string;
}

/* ---------------------------------------------------------------------------------------------------
 * Recommended minimum width (analysis/recommended-width.ts computes it; numbers only, words in report/).
 * ------------------------------------------------------------------------------------------------- */

export type RecommendationBasis =
  /** Critical-width bracket of the central-value runs, plus the margin. */
  | 'bracket'
  /** The width that holds in 95 % of ensemble draws was larger than the bracket: it, plus the margin. */
  | 'ensemble-95'
  /** No strong Allee effect: no finite width pins the front. */
  | 'no-width-stops'
  /** A strong Allee effect, but no width up to the largest tried was verified to pin the front. */
  | 'not-found'
  /** The result has no barrier analysis (no options, or a document from before the analysis). */
  | 'not-computed';

export interface RecommendedWidth {
  basis: RecommendationBasis;
  /** Recommended minimum width [m]; null when no width is recommended (see basis). */
  widthM: number | null;
  /** The model threshold the margin is added to [m] (upper end of the bracket, or the 95 % width). */
  thresholdM: number | null;
  /** Critical-width bracket [crossed, pinned] [m] of the option that sets the threshold. */
  bracketM: [number, number] | null;
  /** Index of the option whose bracket sets the threshold (scenario order); null if none. */
  fromOption: number | null;
  /** Widths that hold in 90 % / 95 % of ensemble draws [m], when the ensemble computed them (largest over options). */
  holds90M: number | null;
  holds95M: number | null;
  /** Draws behind the 90/95 % widths (0 without an ensemble critical width). */
  ensembleDraws: number;
  marginShare: number;
  roundToM: number;
  /** Phase-plane (first-integral) value [m] of the same option, and whether it assumes hosts held at present stocking. */
  phasePlaneM: number | null;
  phasePlaneAssumesIntactHosts: boolean;
  /** Options at least as wide as the recommendation (scenario order). */
  optionsMeeting: number[];
  /** Without a strong Allee effect: the largest delay per 100 m of width over the options [yr]; null otherwise. */
  delayPer100mYears: number | null;
  /** True when, for some option, human transport rather than the width decides (bypass analysis). */
  transportDecides: boolean;
}

