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
  /** Plain-language limits and cautions; every output shows them. */
  cautions: string[];
}

/** Outcome of one barrier option against the baseline. Filled by the barrier analysis. */
export interface OptionResult {
  name: string;
  fromKm: number;
  widthM: number;
  cover: 'clearing' | 'non-host-forest';
  run: RunResult;
  [extra: string]: unknown;
}
