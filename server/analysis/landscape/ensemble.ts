/**
 * Ensembles on a landscape: Latin hypercube draws over the pest's distributions (the transect ensemble's
 * design: McKay, Beckman & Conover 1979, seeded xoshiro128** streams, clipping into each field's range), run
 * on a coarser cell and step, giving P(site reached by the horizon) per option with its standard error.
 * Draws are handed out as tasks of kind 'landscape-draws' through a TaskRunner, so they run inline, on a
 * local pool or on queue workers alike; draw i depends only on the payload and i, never on the worker.
 */
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import { landscapeFromJson, landscapeToJson, type LandscapeJson } from './json.ts';
import type { Pest } from '../../model/pest.ts';
import { centralValue, listUncertain, quantile, resolveQuantities, type Distribution } from '../../model/quantity.ts';
import { formatPath } from '../../model/errors.ts';
import { latinHypercube, makeRng } from '../../numerics/rng.ts';
import { registerTask } from '../../jobs/tasks.ts';
import type { TaskRunner } from '../../jobs/task-runner.ts';
import { clipToField, fieldOfPath, probability } from '../ensemble/ensemble.ts';
import { evaluateLandscape, cellFactor } from './evaluate.ts';
import { automaticStepYears, CLASS_HABITAT, coarsenLandscape, MAP_STEP_FACTOR, type PointPest } from './problem.ts';
import type { LandscapeEnsembleResult, LandscapeSettings, WayPast } from './result.ts';

export const LANDSCAPE_DRAWS_TASK = 'landscape-draws';

/**
 * Default step of the draws as a multiple of the transect's automatic rule: twice a map run's step
 * (MAP_STEP_FACTOR, measured on 100 m cells), because the draws' default cell (200 m) is twice as large and the
 * scheme is second order in space and time, so both errors scale together. On 200 m cells it moves site
 * arrivals by under half the time the front takes to cross a cell (tests/analysis/landscape/step-rule.test.ts;
 * on the bench map ≤ 0.07 yr against a four-times-smaller step, where the 200 m cell itself moves them by
 * ~0.1 yr against 100 m cells).
 */
export const DRAW_STEP_FACTOR = 2 * MAP_STEP_FACTOR;

export interface LandscapeEnsembleSettings {
  draws: number;
  seed: number;
  /** Cell of the draws [m] (the map is averaged onto it); 200 m when absent. */
  cellM?: number;
  /** Draws take time steps this many times the transect's automatic step (default DRAW_STEP_FACTOR). */
  stepFactor?: number;
  /** Draws per task (default: guided, a quarter of each worker's share of the draws left, at most 25). */
  chunk?: number;
  signal?: AbortSignal;
  onProgress?: (done: number, total: number) => void;
}

interface DrawsPayload {
  landscape: LandscapeJson;
  pest: Pest;
  seed: number;
  draws: number;
  indices: number[];
  settings: Pick<LandscapeSettings, 'horizonYears' | 'detectionLevel' | 'mapEdges' | 'infestedDensity'>;
  stepFactor: number;
}

/** One draw's outcome: per option (baseline first) and site whether it was reached, and each option's way past. */
interface DrawResult {
  index: number;
  reached: boolean[][];
  wayPast: WayPast[];
}

/** Uncertain pest parameters in stable depth-first order (paths from the scenario root: pest.…). */
export function pestParameters(pest: Pest): { path: (string | number)[]; distribution: Distribution }[] {
  return listUncertain(pest, ['pest']);
}

/** The pest of draw i: each distribution through its quantile at the Latin hypercube's row i, clipped into its field's range. */
export function drawPest(pest: Pest, seed: number, draws: number, i: number): PointPest {
  const params = pestParameters(pest);
  const k = params.length;
  const unit = latinHypercube(draws, k, makeRng(seed).child(0));
  const byPath = new Map(params.map((p, j) => [formatPath(p.path), clipToField(fieldOfPath(p.path), quantile(p.distribution, unit[i * k + j]))]));
  return resolveQuantities(pest, (d, path) => byPath.get(formatPath(['pest', ...path])) ?? centralValue(d)) as PointPest;
}

function runDraws(p: DrawsPayload): DrawResult[] {
  const l = landscapeFromJson(p.landscape);
  return p.indices.map((i) => {
    const pest = drawPest(p.pest, p.seed, p.draws, i);
    const habitats = new Set<number>();
    for (const c of l.classAtCells) if (c !== RASTER_CLASSES.indexOf('outside')) habitats.add(c);
    for (const b of l.bands) habitats.add(RASTER_CLASSES.indexOf(b.treatment === 'clearing' ? 'open' : 'nonhost'));
    const stepYears = p.stepFactor * automaticStepYears(pest, [...habitats].map((c) => CLASS_HABITAT[c]));
    // A draw keeps only which sites were reached and the way past: its runs stop once those are decided.
    const r = evaluateLandscape(l, pest, { ...p.settings, stepYears, crossSection: false, stopWhenSitesReached: true });
    const reachedOf = (sites: { detectedYears: number | null; fringeOnly: boolean }[]) => sites.map((s) => s.detectedYears !== null && !s.fringeOnly);
    return {
      index: i,
      reached: [reachedOf(r.baseline.sites), ...r.options.map((o) => reachedOf(o.run.sites))],
      wayPast: r.options.map((o) => (o.pinning.verified ? 'none' : o.wayPast)),
    };
  });
}

registerTask<DrawsPayload, DrawResult[]>(LANDSCAPE_DRAWS_TASK, runDraws);

/**
 * Runs the ensemble through the runner.
 * @throws CancelledError when the signal aborts
 */
export async function runLandscapeEnsemble(
  landscape: RasterLandscape,
  pest: Pest,
  settings: LandscapeSettings,
  e: LandscapeEnsembleSettings,
  runner: TaskRunner,
): Promise<LandscapeEnsembleResult> {
  const params = pestParameters(pest);
  const draws = params.length === 0 ? 1 : e.draws;
  const cellM = e.cellM ?? 200;
  const coarse = coarsenLandscape(landscape, cellFactor(landscape, cellM));
  const json = landscapeToJson(coarse);
  // Guided chunks: a quarter of each worker's share of the draws left, at most 25, so that the last tasks
  // are small and no worker waits long for another's last chunk (draws differ in cost: a run stops once its
  // sites are reached). The draws are the same whatever the chunks (each is fixed by its index).
  const workers = Math.max(1, runner.concurrency);
  const chunkAt = (left: number) => e.chunk ?? Math.max(1, Math.min(25, Math.ceil(left / (4 * workers))));
  const payloads: DrawsPayload[] = [];
  for (let a = 0, chunk = chunkAt(draws); a < draws; a += chunk, chunk = chunkAt(draws - a)) {
    payloads.push({
      landscape: json,
      pest,
      seed: e.seed,
      draws,
      indices: Array.from({ length: Math.min(chunk, draws - a) }, (_, j) => a + j),
      settings: { horizonYears: settings.horizonYears, detectionLevel: settings.detectionLevel, mapEdges: settings.mapEdges, infestedDensity: settings.infestedDensity },
      stepFactor: e.stepFactor ?? DRAW_STEP_FACTOR,
    });
  }
  let done = 0;
  const chunks = await runner.map<DrawsPayload, DrawResult[]>(LANDSCAPE_DRAWS_TASK, payloads, {
    signal: e.signal,
    key: `landscape-ensemble:${e.seed}:${draws}`,
    onResult: (_, r) => {
      done += r.length;
      e.onProgress?.(done, draws);
    },
  });
  const results = chunks.flat().sort((a, b) => a.index - b.index);
  const n = results.length;
  const siteNames = coarse.sites.map((s) => s.name);
  const reachedBy = (option: number) => siteNames.map((name, s) => ({ name, reached: probability(results.filter((r) => r.reached[option][s]).length, n) }));
  return {
    draws,
    completed: n,
    seed: e.seed,
    cellM: coarse.cellM,
    stepFactor: e.stepFactor ?? DRAW_STEP_FACTOR,
    parameters: params.map((p) => ({ path: formatPath(p.path), distribution: p.distribution, centralValue: centralValue(p.distribution) })),
    baseline: { sites: reachedBy(0) },
    options: coarse.bands.map((b, j) => {
      const wayPast: Record<WayPast, number> = { through: 0, around: 0, none: 0 };
      for (const r of results) wayPast[r.wayPast[j]]++;
      return { id: b.id, sites: reachedBy(1 + j), wayPast };
    }),
    status: 'complete',
  };
}
