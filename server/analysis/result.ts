/**
 * The result document: what one evaluation produces, for the CLI (--json), the API, the web pages and
 * the briefing. Plain JSON (numbers, strings, arrays); times in years, positions in km, widths in m.
 * Documented field by field in the README ("Result document").
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
    steps: number;
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
  uncertainty?: Record<string, unknown>;
  /** Human-carried bypass risk, when the scenario describes transport. Filled by the bypass analysis. */
  bypass?: Record<string, unknown>;
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
}

export interface WidthDelayRow {
  widthM: number;
  /** Front verified pinned at this width. */
  pinned: boolean;
  /** Year the front passed the far edge of the clearing; null if not within the run. */
  crossingYears: number | null;
  /** Delay at each site (scenario order) [yr]; null where not defined. */
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
}
