/**
 * A landscape scenario from file, form or API to its result document: load the map (server/domain/gis),
 * run the 2-D analysis (`evaluateLandscape`, server/analysis/landscape/) and summarise per option what a
 * decision needs — verdict, the way the pest gets past (through / around / none), arrivals at each
 * protected site, trees removed and cost. CLI, web routes and the briefing all call this one function.
 */
import { createHash } from 'node:crypto';
import type { LandscapeScenario } from '../model/landscape.ts';
import { pointLandscapeScenario } from '../model/landscape.ts';
import { fingerprint } from '../model/canonical.ts';
import { TOOL } from '../version.ts';
import { loadLandscape, type LoadedLandscape, type MapFiles } from '../domain/gis/load.ts';
import { evaluateLandscape, evaluateLandscapeOn } from './landscape/evaluate.ts';
import type { TaskRunner } from '../jobs/task-runner.ts';
import { fieldToJson, type LandscapeResult, type WayPast } from './landscape/result.ts';
import { CAUTIONS } from './evaluate/cautions.ts';
import { pestParameters, runLandscapeEnsemble } from './landscape/ensemble.ts';
import { fieldOfPath } from './ensemble/plan.ts';
import { makeInlineRunner } from '../jobs/inline-runner.ts';
import type { LandscapeEnsembleResult, LandscapeSettings } from './landscape/result.ts';

export const LANDSCAPE_DOCUMENT_VERSION = 1;

/** One site's arrival for an option, against doing nothing. */
export interface LandscapeArrivalRow {
  site: string;
  /** Breeding-population arrival without the band / with it [yr since start]; null = not within the horizon. */
  baselineYears: number | null;
  optionYears: number | null;
  /** Years bought (positive) or lost (negative); null unless both arrive. */
  delayYears: number | null;
  wayPast: WayPast | null;
  sentence: string;
}

/** What the CLI's --json prints per option: the decision summary, then the full result under `result`. */
export interface LandscapeOptionSummary {
  key: string;
  name: string;
  verdict: { kind: string; sentence: string; why: string };
  /** How the pest gets past the band: through it, around its ends, or not at all within the horizon. */
  wayPast: WayPast;
  wayPastSentence: string;
  arrivals: LandscapeArrivalRow[];
  /** Host stems inside the band (band cover × host stems per ha × area). */
  treesRemoved: number;
  bandAreaHa: number;
  cost: { stems: number | null; area: number | null; total: number | null; unit: string | null };
  /** The band's 1-D cross-section critical width [m] (a transect result beside the 2-D one), when computed. */
  crossSectionCriticalWidthM: [number, number] | null;
  pinningVerified: boolean;
  /** People carrying the pest past the band (central values), when the scenario has a transport block. */
  transport?: { probability: number; expectedColonies: number; halfYears: number | null; blockKm: number };
}

export interface LandscapeDocument {
  documentVersion: number;
  kind: 'landscape';
  tool: { name: string; version: string };
  /** SHA-256 of the canonical scenario together with the SHA-256 of each map file it names. */
  scenarioFingerprint: string;
  mapFiles: Record<string, string>;
  runAt: string;
  title: string;
  description: string;
  region?: string;
  /** `fitted`: the survey fit's provenance sentence, when the scenario's movement rate was fitted to records. */
  pest: { name: string; illustrative: boolean; fitted?: string };
  horizonYears: number;
  detectionLevel: number;
  map: {
    crs: { code: string; name: string };
    cellM: number;
    nx: number;
    ny: number;
    originXM: number;
    originYM: number;
    outside: 'impassable' | 'lethal';
    notes: string[];
  };
  baseline: { arrivals: { site: string; detectedYears: number | null; breedingYears: number | null }[] };
  options: LandscapeOptionSummary[];
  /** Chance of arrival over the pest's uncertain parameters (present when the scenario asks for draws). */
  ensemble?: LandscapeEnsembleSummary;
  cautions: string[];
  notes: string[];
}

/** P(site reached within the horizon) without a band and with each, over Latin hypercube draws. */
export interface LandscapeEnsembleSummary {
  draws: number;
  seed: number;
  /** Model cell of the draws [m] (the central run's) and their step as a multiple of the transect rule. */
  cellM: number;
  stepFactor: number;
  /** Uncertain parameters: path, the label forms use, central value. */
  parameters: { path: string; label: string; centralValue: number }[];
  /** Share of draws in which the site saw a breeding population by the horizon, with its standard error. */
  baseline: { site: string; p: number; standardError: number }[];
  options: { key: string; name: string; sites: { site: string; p: number; standardError: number }[]; wayPast: Record<WayPast, number> }[];
}

/** A loaded map, its result and the document, kept together for maps and downloads. */
export interface LandscapeEvaluation {
  loaded: LoadedLandscape;
  result: LandscapeResult;
  doc: LandscapeDocument;
}

export interface LandscapeRunOptions {
  onProgress?: (fraction: number, message: string) => void;
  shouldCancel?: () => boolean;
  /** Run date (ISO); now by default. */
  runAt?: string;
  /** Skip the band's 1-D cross-section analysis (quicker; tests). */
  crossSection?: boolean;
  /**
   * Where the runs go (the baseline and every option at once): a local pool or queue workers. Without it
   * every run takes this thread in turn. The numbers are the same either way.
   */
  runner?: TaskRunner;
  /** Stops a run handed to the runner (with `runner`; `shouldCancel` covers the one-thread case). */
  signal?: AbortSignal;
}

/** Share of the progress bar the central runs take when an ensemble follows. */
const CENTRAL_SHARE = 0.35;

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** Names of the map files a scenario reads. */
export function mapFileNames(s: Pick<LandscapeScenario, 'map'>): string[] {
  const m = s.map;
  return m.format === 'geotiff' && m.classes ? [m.file, m.classes.file] : [m.file];
}

/** Fingerprint of a scenario with its map files (a change to either changes it). */
export function landscapeFingerprint(s: LandscapeScenario, files: MapFiles): { fingerprint: string; mapFiles: Record<string, string> } {
  const mapFiles = Object.fromEntries(mapFileNames(s).map((n) => [n, files[n] ? sha256(files[n]) : 'missing']));
  return { fingerprint: fingerprint({ scenario: s, mapFiles }), mapFiles };
}

const round2 = (v: number | null) => (v === null || !Number.isFinite(v) ? null : Math.round(v * 100) / 100);

/**
 * Loads the map and evaluates every band option.
 * @throws the loader's named map errors (MapError subclasses, with problems) and the analysis's InputError
 */
export async function evaluateLandscapeScenario(scenario: LandscapeScenario, files: MapFiles, opts: LandscapeRunOptions = {}): Promise<LandscapeEvaluation> {
  const s = pointLandscapeScenario(scenario);
  const loaded = await loadLandscape(scenario, files);
  const settings = {
    horizonYears: s.horizonYears,
    detectionLevel: s.detectionLevel,
    stepYears: s.numerics.stepYears,
    mapEdges: 'reflecting' as const,
    infestedDensity: s.infestation.density,
    costPerStem: s.bands.costPerStem,
    costUnit: s.bands.costUnit,
    transport: s.transport ? { ratePerKm2Year: s.transport.ratePerKm2Year, establishmentProbability: s.transport.establishmentProbability, kernel: s.transport.kernel } : undefined,
    crossSection: opts.crossSection,
    shouldCancel: opts.shouldCancel,
    onProgress: opts.onProgress,
  };
  const uncertain = scenario.uncertainty !== undefined && pestParameters(scenario.pest).length > 0;
  const centralProgress = uncertain && opts.onProgress ? (f: number, m: string) => opts.onProgress!(CENTRAL_SHARE * f, m) : opts.onProgress;
  const central = { ...settings, onProgress: centralProgress };
  const result = opts.runner
    ? await evaluateLandscapeOn(opts.runner, loaded, scenario.pest, { ...central, signal: opts.signal })
    : evaluateLandscape(loaded, scenario.pest, central);
  const extraNotes: string[] = [];
  if (scenario.uncertainty && !uncertain) extraNotes.push('The scenario asks for draws, but no pest parameter has a range: only the central values were run.');
  if (uncertain) result.ensemble = await landscapeDraws(scenario, loaded, result.grid.cellM, settings, opts);
  const { fingerprint: fp, mapFiles } = landscapeFingerprint(scenario, files);
  const cautions = [...result.cautions];
  for (const c of CAUTIONS) if (!cautions.includes(c)) cautions.push(c);
  const options: LandscapeOptionSummary[] = result.options.map((o, k) => {
    const areaHa = o.areaM2 / 1e4;
    const areaCost = s.bands.costPerHa !== undefined ? s.bands.costPerHa * areaHa : null;
    const stemCost = o.trees.cost;
    return {
      key: String.fromCharCode(65 + k), // A, B, … (≤ 8 options): the letters the maps and tables use
      name: o.label,
      verdict: o.verdict,
      wayPast: o.wayPast,
      wayPastSentence: o.wayPastSentence,
      arrivals: o.sites.map((v) => ({ site: v.name, baselineYears: round2(v.baselineArrivalYears), optionYears: round2(v.optionArrivalYears), delayYears: round2(v.delayYears), wayPast: v.wayPast, sentence: v.sentence })),
      treesRemoved: Math.round(o.trees.stemsRemoved),
      bandAreaHa: Math.round(areaHa * 100) / 100,
      cost: {
        stems: stemCost,
        area: areaCost,
        total: stemCost === null && areaCost === null ? null : (stemCost ?? 0) + (areaCost ?? 0),
        unit: s.bands.costUnit ?? null,
      },
      crossSectionCriticalWidthM: o.crossSection?.bracketM ?? null,
      pinningVerified: o.pinning.verified,
      ...(o.transport ? { transport: { probability: o.transport.probability, expectedColonies: o.transport.expectedColonies, halfYears: round2(o.transport.halfYears), blockKm: o.transport.blockKm } } : {}),
    };
  });
  const doc: LandscapeDocument = {
    documentVersion: LANDSCAPE_DOCUMENT_VERSION,
    kind: 'landscape',
    tool: { ...TOOL },
    scenarioFingerprint: fp,
    mapFiles,
    runAt: opts.runAt ?? new Date().toISOString(),
    title: s.title,
    description: s.description,
    region: s.region,
    pest: { name: s.pest.name, illustrative: s.pest.illustrative, ...(scenario.calibration ? { fitted: scenario.calibration.sentence } : {}) },
    horizonYears: s.horizonYears,
    detectionLevel: s.detectionLevel,
    map: { crs: { code: loaded.crs.code, name: loaded.crs.name }, cellM: result.grid.cellM, nx: result.grid.nx, ny: result.grid.ny, originXM: result.grid.originXM, originYM: result.grid.originYM, outside: loaded.outside, notes: loaded.notes },
    baseline: { arrivals: result.baseline.sites.map((a) => ({ site: a.name, detectedYears: round2(a.detectedYears), breedingYears: round2(a.breedingYears) })) },
    options,
    ...(result.ensemble ? { ensemble: ensembleSummary(result.ensemble, options) } : {}),
    cautions,
    notes: [...loaded.notes, ...result.notes, ...extraNotes],
  };
  return { loaded, result, doc };
}

/** The document with the full result attached, as JSON text (typed-array fields as plain arrays, NaN → null). */
export function landscapeJson(ev: Pick<LandscapeEvaluation, 'doc' | 'result'>): string {
  const r = ev.result;
  const run = (x: LandscapeResult['baseline']) => ({ ...x, arrival: { maxYears: x.arrival.maxYears, years: fieldToJson(x.arrival) } });
  const result = { ...r, baseline: run(r.baseline), options: r.options.map((o) => ({ ...o, run: run(o.run) })) };
  // The summary indented for reading; the full result (with its per-cell fields) on one line.
  const head = JSON.stringify(ev.doc, null, 1);
  return `${head.slice(0, -2)},\n "result": ${JSON.stringify(result)}\n}\n`;
}

/** The map ensemble of a scenario with ranges and draws, after its central runs (progress from CENTRAL_SHARE on). */
async function landscapeDraws(
  scenario: LandscapeScenario,
  loaded: LoadedLandscape,
  cellM: number,
  settings: Pick<LandscapeSettings, 'horizonYears' | 'detectionLevel' | 'mapEdges' | 'infestedDensity'>,
  opts: LandscapeRunOptions,
): Promise<LandscapeEnsembleResult> {
  const u = scenario.uncertainty!;
  // Draws on the central run's cell (a coarser one would blur bands a few cells wide away) and a longer step.
  const cancelled = new AbortController();
  return runLandscapeEnsemble(
    loaded,
    scenario.pest,
    settings,
    {
      draws: u.draws,
      seed: u.seed,
      cellM,
      stepFactor: u.resolutionFactor, // absent: DRAW_STEP_FACTOR (landscape/ensemble.ts)
      signal: opts.signal ?? cancelled.signal,
      onProgress: (done, total) => {
        if (opts.shouldCancel?.()) cancelled.abort();
        opts.onProgress?.(CENTRAL_SHARE + (1 - CENTRAL_SHARE) * (done / total), `draws: ${done} of ${total}`);
      },
    },
    opts.runner ?? makeInlineRunner(),
  );
}

/** The ensemble as the document carries it: per site the chance of arrival, per option the way past tallies. */
function ensembleSummary(e: LandscapeEnsembleResult, keys: readonly Pick<LandscapeOptionSummary, 'key' | 'name'>[]): LandscapeEnsembleSummary {
  const site = (x: { name: string; reached: { p: number; standardError: number } }) => ({ site: x.name, p: x.reached.p, standardError: x.reached.standardError });
  return {
    draws: e.completed,
    seed: e.seed,
    cellM: e.cellM,
    stepFactor: e.stepFactor,
    parameters: e.parameters.map((p) => ({ path: p.path, label: fieldOfPath(p.path.split('.')).label, centralValue: p.centralValue })),
    baseline: e.baseline.sites.map(site),
    options: e.options.map((o, k) => ({ key: keys[k].key, name: keys[k].name, sites: o.sites.map(site), wayPast: o.wayPast })),
  };
}
