/**
 * The result of a landscape (2-D map) evaluation: what `evaluateLandscape` returns and what the CLI, the
 * web pages, the PDF briefing and the downloads read. Times in years since the start, areas in m², map
 * coordinates in the map's projected CRS [m]. Per-cell fields are row-major, row 0 at the NORTH edge, on
 * the grid described by `grid` (the model's grid, which may be coarser than the input raster).
 *
 * JSON: typed-array fields (`ArrivalField.years`) do not survive JSON.stringify; write them with
 * `fieldToJson` (below) or as a GeoTIFF. Everything else is plain data.
 */
import type { MapTransportRisk } from './transport.ts';
import type { PointKernel } from '../bypass/bypass.ts';
import type { ProbabilityEstimate, VerdictKind } from '../result.ts';

export const LANDSCAPE_RESULT_VERSION = 1;

/** The model grid of a run (same conventions as RasterGeometry in server/domain/raster.ts). */
export interface LandscapeGrid {
  nx: number;
  ny: number;
  /** Cell side [m]. */
  cellM: number;
  /** Map x of the west edge of column 0 [m]. */
  originXM: number;
  /** Map y of the north edge of row 0 [m]. */
  originYM: number;
  crs: { code: string; proj4: string; name: string };
}

/**
 * First year each cell reached the detection level (linear in time between steps); NaN where it never did
 * within the run, and NaN on 'outside' cells. Row-major, row 0 north, length nx·ny of `LandscapeResult.grid`.
 */
export interface ArrivalField {
  years: Float32Array;
  /** Largest finite value (the last year a new cell was reached), or null when no cell was ever reached. */
  maxYears: number | null;
}

/** Arrival at one protected site in one run. */
export interface LandscapeSiteArrival {
  name: string;
  /** First year any cell of the site reached the detection level; null if not within the run. */
  detectedYears: number | null;
  /**
   * First year a breeding population stands at the site: density at the established level (halfway between
   * the Allee-related threshold θ and the capacity; the transect's rule), or — without a strong Allee effect,
   * where every population above the detection level grows — the detection year. Null if not within the run.
   */
  breedingYears: number | null;
  /** True when the site saw the detection level but no breeding population formed (the thin fringe ahead of a held front). */
  fringeOnly: boolean;
}

/** One simulated run (the baseline or an option) on the map. */
export interface LandscapeRun {
  arrival: ArrivalField;
  sites: LandscapeSiteArrival[];
  /** Area at or above the detection level over time (for charts and the transport kernel). */
  series: { timesYears: number[]; occupiedKm2: number[]; totalInsects: number[] };
  /** Host stems alive at the end as a share of those at the start, and stems killed. */
  host: { shareRemaining: number; stemsKilled: number };
  /** The year the run ended (the horizon, or earlier when stopped after every event). */
  endYears: number;
  numerics: LandscapeNumerics;
}

export interface LandscapeNumerics {
  /** Model cell [m] and time step [yr]. */
  cellM: number;
  stepYears: number;
  steps: number;
  /** Steps redone with the positive first-order fallback. */
  fallbackSteps: number;
  /** Largest number of cells in the computed (active) part of the map, and the map's cells. */
  activeCellsMax: number;
  mapCells: number;
  /** Method in words, e.g. "finite volumes on the square raster, TR-BDF2 with approximately factorised line solves". */
  method: string;
  wallMs: number;
}

/** How the pest got past a band: through its interior, around its ends, or not within the horizon. */
export type WayPast = 'through' | 'around' | 'none';

/** One protected site's outcome for an option. */
export interface LandscapeSiteVerdict {
  name: string;
  /** True when the band lies in the pest's way to the site (in the baseline, every path around the band's cells arrives later). */
  behindBand: boolean;
  baselineArrivalYears: number | null;
  optionArrivalYears: number | null;
  /** option − baseline breeding arrival [yr]; positive = time bought; null unless both arrive. */
  delayYears: number | null;
  /** How the pest reached the site with the band in place (null when not behind the band or not reached). */
  wayPast: WayPast | null;
  kind: VerdictKind;
  sentence: string;
  costPerYearOfDelay: number | null;
}

/** Result for one band option. */
export interface LandscapeOptionResult {
  id: string;
  label: string;
  treatment: 'clearing' | 'nonhost-planting';
  /** Band area as given [m²] and the area the model grid treats as band (cells ≥ half inside) [m²]. */
  areaM2: number;
  modelAreaM2: number;
  run: LandscapeRun;
  verdict: { kind: VerdictKind; sentence: string; why: string };
  /** Way past for the option as a whole: the way of the first protected site behind the band that was reached. */
  wayPast: WayPast;
  wayPastSentence: string;
  /** Band cells in the model, those reached at the detection level, and its core (cells farthest from its edges) reached. */
  bandCells: { total: number; reached: number; core: number; coreReached: number };
  /** "holds" only with evidence: a verified steady state or a die-out bound; otherwise not verified and why. */
  pinning: { verified: boolean; method: 'steady-state' | 'upper-solution' | 'none'; detail: string };
  sites: LandscapeSiteVerdict[];
  trees: { stemsRemoved: number; cost: number | null; costUnit: string | null };
  /** Spread speed along the way to the sites, baseline and with the band [km/yr] (sites' distance over arrival), when measurable. */
  speeds: { baselineKmPerYear: number | null; optionKmPerYear: number | null };
  /**
   * The band's cross-section: the 1-D transect analysis along the band's normal (host forest — band — host
   * forest at the band's surrounding stocking). Its critical width is a 1-D result, stated as such beside
   * the 2-D outcome; null when the band width is unknown or the analysis was skipped.
   */
  crossSection: {
    widthM: number;
    stocking: number;
    applicable: boolean;
    bracketM: [number, number] | null;
    phasePlaneM: number | null;
    note: string;
  } | null;
  /** People carrying the pest past the band (analysis/landscape/transport.ts); null without a transport block. */
  transport: MapTransportRisk | null;
}

/** Ensemble over the pest's distributions at a coarser cell: P(site reached by the horizon) per option. */
export interface LandscapeEnsembleResult {
  draws: number;
  completed: number;
  seed: number;
  /** Cell used by the draws [m]. */
  cellM: number;
  /** The draws' time step as a multiple of the transect's automatic step. */
  stepFactor: number;
  parameters: { path: string; distribution: unknown; centralValue: number }[];
  baseline: { sites: { name: string; reached: ProbabilityEstimate }[] };
  options: { id: string; sites: { name: string; reached: ProbabilityEstimate }[]; wayPast: Record<WayPast, number> }[];
  status: 'complete' | 'cancelled';
}

export interface LandscapeResult {
  resultVersion: number;
  kind: 'landscape';
  grid: LandscapeGrid;
  horizonYears: number;
  detectionLevel: number;
  /** Map edges and 'outside' cells as modelled. */
  edges: { mapEdges: 'reflecting' | 'lethal'; outside: 'impassable' | 'lethal' };
  baseline: LandscapeRun;
  options: LandscapeOptionResult[];
  ensemble: LandscapeEnsembleResult | null;
  /** Limits and cautions in plain words (the usual cautions of tree felling and quarantine decisions). */
  cautions: string[];
  /** Notes on what was not computed (e.g. a skipped cross-section), in plain words. */
  notes: string[];
}

/** A per-cell field as plain JSON: values rounded to 0.01 yr, null where NaN. */
export function fieldToJson(f: ArrivalField): (number | null)[] {
  return Array.from(f.years, (v) => (Number.isFinite(v) ? Math.round(v * 100) / 100 : null));
}

/** What `evaluateLandscape` needs besides the map and the pest. */
export interface LandscapeSettings {
  /** Simulated years, > 0. */
  horizonYears: number;
  /** Detection level [fraction of the capacity of fully stocked host forest]; 0.01 when absent. */
  detectionLevel?: number;
  /**
   * Model cell [m]: an integer multiple of the map's cell (the map is area-averaged onto it); the map's own
   * cell when absent. A value that is not a multiple is rounded to the nearest multiple (at least 1).
   */
  cellM?: number;
  /** Time step [yr]; automatic (the transect's rule) when absent. */
  stepYears?: number;
  /** Map edges: reflecting (no one leaves; default) or lethal (density held at zero beyond). */
  mapEdges?: 'reflecting' | 'lethal';
  /** Density of the infested share at the start [fraction of capacity]; 1 when absent. */
  infestedDensity?: number;
  /** Cost per host stem removed and its unit (cost is null without it). */
  costPerStem?: number;
  costUnit?: string;
  /** Human-carried introductions (central values): rate per km² of infested forest per year, kernel, establishment. */
  transport?: { ratePerKm2Year: number; establishmentProbability: number; kernel: PointKernel };
  /** Run the band cross-section's 1-D critical-width analysis (default true; the costly part). */
  crossSection?: boolean;
  /**
   * Stop each run once every protected site is reached and the way past is decided (default false; the
   * ensemble's draws, which keep only those): arrival maps, host loss and series then cover only the
   * years run, so a single evaluation keeps this off.
   */
  stopWhenSitesReached?: boolean;
  /** Checked between steps; when it returns true the evaluation stops with a CancelledError. */
  shouldCancel?: () => boolean;
  /** Progress as a fraction 0–1 with a few words. */
  onProgress?: (fraction: number, message: string) => void;
}
