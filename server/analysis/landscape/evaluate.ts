/**
 * Evaluates a landscape map: the baseline and every band option on the 2-D engine, with per-site arrivals
 * and delays, the way the pest gets past each band (through, around, or not within the horizon), trees
 * removed and cost, evidence for "holds", and the band's 1-D cross-section critical width beside it.
 */
import { createHash } from 'node:crypto';
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import type { Pest } from '../../model/pest.ts';
import { resolveQuantities } from '../../model/quantity.ts';
import { InputError } from '../../model/errors.ts';
import type { TaskRunner } from '../../jobs/task-runner.ts';
import { CAUTIONS } from '../evaluate/cautions.ts';
import { coarsenLandscape, cutBand, habitatsOf, landscapeProblem, mapStepYears, type LandscapeProblem, type PointPest } from './problem.ts';
import { runLandscapeProblem } from './run.ts';
import { holdPrecheck, verifyHold } from './holds.ts';
import { landscapeToJson, rawFromJson, type LandscapeJson, type RawRunJson } from './json.ts';
import { LANDSCAPE_HOLD_TASK, LANDSCAPE_RUN_TASK, type LandscapeHoldPayload, type LandscapeRunPayload } from './run-tasks.ts';
import { baselineFacts, finishOption, holdSettings, optionFacts, wayPastToleranceYears, type BaselineFacts, type EvaluationPlan, type OptionFacts } from './option.ts';
import { LANDSCAPE_RESULT_VERSION, type LandscapeOptionResult, type LandscapeResult, type LandscapeSettings } from './result.ts';

const HOST_CLASS = RASTER_CLASSES.indexOf('host');

/** Limits and cautions of the map analysis (plus the shared cautions on felling and regulation). */
export const LANDSCAPE_LIMITS: readonly string[] = [
  'The map is modelled on square cells; a cell counts as band when at least half of it lies inside the band, so band edges are resolved to about one cell.',
  'Insects are treated as a continuous density. Very small numbers, chance events and single long flights are not represented.',
  'People moving infested wood (firewood, logs, nursery stock, vehicles) are not part of the spread model; a band does nothing against such transport.',
  'Host trees do not regrow within the horizon, and sprouts, regeneration, ornamental and isolated host trees are assumed absent from the band.',
  'Infestations are usually found years after they start: the real front is likely ahead of the mapped one.',
];

/** The model cell's factor over the map's cell for a requested cell size. */
export function cellFactor(l: RasterLandscape, cellM: number | undefined): number {
  if (cellM === undefined) return 1;
  return Math.max(1, Math.round(cellM / l.cellM));
}

function checkSettings(l: RasterLandscape, s: LandscapeSettings): void {
  const problems = [];
  if (!(s.horizonYears > 0) || !Number.isFinite(s.horizonYears)) problems.push({ path: 'horizonYears', value: s.horizonYears, message: 'must be a finite number > 0 yr' });
  const d = s.detectionLevel ?? 0.01;
  if (!(d > 0 && d < 1)) problems.push({ path: 'detectionLevel', value: d, message: 'must be > 0 and < 1 (a fraction of capacity)' });
  if (s.cellM !== undefined && !(s.cellM > 0 && Number.isFinite(s.cellM))) problems.push({ path: 'numerics.cellM', value: s.cellM, message: 'must be a finite number > 0 m' });
  if (s.stepYears !== undefined && !(s.stepYears > 0 && Number.isFinite(s.stepYears))) problems.push({ path: 'numerics.stepYears', value: s.stepYears, message: 'must be a finite number > 0 yr' });
  let infested = false;
  for (let k = 0; k < l.infestedAtCells.length; k++) if (l.infestedAtCells[k] > 0 && l.classAtCells[k] === HOST_CLASS) infested = true;
  if (!infested) problems.push({ path: 'infestation', value: null, message: 'must cover at least one host-forest cell of the map' });
  if (problems.length > 0) throw new InputError('SETTINGS_INVALID', problems);
}

/** The map on the model cell, the pest's central values and the one step every run takes. */
export function planEvaluation(landscape: RasterLandscape, pest: Pest | PointPest, settings: LandscapeSettings): EvaluationPlan {
  checkSettings(landscape, settings);
  const point = resolveQuantities(pest) as PointPest;
  const factor = cellFactor(landscape, settings.cellM);
  const l = coarsenLandscape(landscape, factor);
  const level = settings.detectionLevel ?? 0.01;
  const base = { mapEdges: settings.mapEdges ?? 'reflecting', infestedDensity: settings.infestedDensity ?? 1, horizonYears: settings.horizonYears, detectionLevel: settings.detectionLevel } as const;
  const notes: string[] = [];
  if (factor > 1) notes.push(`The map (${landscape.cellM} m cells) was averaged onto ${l.cellM} m model cells.`);
  if (settings.crossSection === false) notes.push('The bands’ 1-D cross-section critical widths were not computed (switched off).');
  // All runs share the smallest automatic step so that arrivals compare like with like.
  const stepYears = settings.stepYears ?? Math.min(...[undefined, ...l.bands.map((_, j) => j)].map((band) => mapStepYears(point, habitatsOf(cutBand(l, band).classAtCells))));
  return { landscape, l, point, settings, level, common: { ...base, stepYears }, notes };
}

function problemOf(plan: EvaluationPlan, band: number | undefined): LandscapeProblem {
  return landscapeProblem(plan.l, plan.point, { ...plan.common, band });
}

/** Runs in an evaluation: the baseline (band undefined), then each option. */
function runBands(plan: EvaluationPlan): (number | undefined)[] {
  return [undefined, ...plan.l.bands.map((_, j) => j)];
}

function runLabel(plan: EvaluationPlan, band: number | undefined): string {
  return band === undefined ? 'baseline' : plan.l.bands[band].label;
}

function assemble(plan: EvaluationPlan, base: BaselineFacts, facts: OptionFacts[], pinnings: LandscapeOptionResult['pinning'][]): LandscapeResult {
  const { l, settings } = plan;
  const crossSections = new Map<string, LandscapeOptionResult['crossSection']>();
  const options = facts.map((f, j) => finishOption(plan, f, pinnings[j], crossSections));
  settings.onProgress?.(1, 'done');
  return {
    resultVersion: LANDSCAPE_RESULT_VERSION,
    kind: 'landscape',
    grid: { nx: l.nx, ny: l.ny, cellM: l.cellM, originXM: l.originXM, originYM: l.originYM, crs: l.crs },
    horizonYears: settings.horizonYears,
    detectionLevel: plan.level,
    edges: { mapEdges: plan.common.mapEdges, outside: l.outside },
    baseline: base.summary,
    options,
    ensemble: null,
    cautions: [...LANDSCAPE_LIMITS, ...CAUTIONS],
    notes: plan.notes,
  };
}

/**
 * Evaluates the landscape for the pest (central values of any distributions) over the horizon, every run
 * on this thread (the ensemble's draws call this inside their tasks).
 * @throws InputError for settings out of range (field, value and allowed range named)
 * @throws CancelledError when `shouldCancel` returned true
 */
export function evaluateLandscape(landscape: RasterLandscape, pest: Pest | PointPest, settings: LandscapeSettings): LandscapeResult {
  const plan = planEvaluation(landscape, pest, settings);
  const bands = runBands(plan);
  const stop = { stopWhenSitesReached: settings.stopWhenSitesReached, stopMarginYears: (a: number) => wayPastToleranceYears(plan.common.stepYears, a) };
  const runs = bands.map((band, i) => {
    const problem = problemOf(plan, band);
    const onProgress = (f: number) => settings.onProgress?.((i + f) / (bands.length + 0.5), runLabel(plan, band));
    return { problem, raw: runLandscapeProblem(problem, plan.point, { horizonYears: settings.horizonYears, detectionLevel: plan.level, shouldCancel: settings.shouldCancel, onProgress, ...stop }) };
  });
  const base = baselineFacts(plan, runs[0].problem, runs[0].raw);
  const facts = runs.slice(1).map((r, j) => optionFacts(plan, base, j, r.problem, r.raw));
  const pinnings = facts.map((f) => verifyHold(f.p, f.raw, plan.point, holdSettings(plan, f)));
  return assemble(plan, base, facts, pinnings);
}

/** A name for one evaluation's batch of tasks, from its content (a queue runner keys task ids on it). */
function batchKey(plan: EvaluationPlan, json: LandscapeJson): string {
  const h = createHash('sha256');
  h.update(JSON.stringify({ pest: plan.point, common: plan.common, grid: [json.nx, json.ny, json.cellM, json.originXM, json.originYM, json.crs.code] }));
  for (const a of [plan.l.classAtCells, plan.l.hostCoverAtCells, plan.l.stemsAtCells, plan.l.infestedAtCells, ...plan.l.bands.map((b) => b.cover), ...plan.l.sites.map((s) => s.cells)]) {
    h.update(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  }
  return `landscape:${h.digest('hex').slice(0, 32)}`;
}

/**
 * The same evaluation with its runs handed out through the task runner: the baseline and every option at
 * once, then the steady-state continuations of the options whose "holds" check needs one. Results are those
 * of `evaluateLandscape`, bit for bit (tests/analysis/landscape/evaluate-on.test.ts).
 * @throws InputError for settings out of range
 * @throws CancelledError when the signal aborts
 */
export async function evaluateLandscapeOn(runner: TaskRunner, landscape: RasterLandscape, pest: Pest | PointPest, settings: LandscapeSettings & { signal?: AbortSignal }): Promise<LandscapeResult> {
  const plan = planEvaluation(landscape, pest, settings);
  const bands = runBands(plan);
  const json = landscapeToJson(plan.l);
  const key = batchKey(plan, json);
  const run = { horizonYears: settings.horizonYears, detectionLevel: plan.level };
  const shares = new Array<number>(bands.length).fill(0);
  const report = (i: number, f: number) => {
    shares[i] = Math.max(shares[i], Math.min(1, f));
    settings.onProgress?.(shares.reduce((a, b) => a + b, 0) / (bands.length + 0.5), runLabel(plan, bands[i]));
  };
  // The problems first: they check the limits (cells, steps) before any work is handed out.
  const problems = bands.map((band) => problemOf(plan, band));
  const payloads: LandscapeRunPayload[] = bands.map((band) => ({ landscape: json, pest: plan.point, problem: { ...plan.common, band }, run }));
  const raws = (
    await runner.map<LandscapeRunPayload, RawRunJson>(LANDSCAPE_RUN_TASK, payloads, {
      signal: settings.signal,
      key: `${key}:runs`,
      onProgress: (i, f) => report(i, f),
      onResult: (i) => report(i, 1),
    })
  ).map(rawFromJson);
  const base = baselineFacts(plan, problems[0], raws[0]);
  const facts = raws.slice(1).map((raw, j) => optionFacts(plan, base, j, problems[1 + j], raw));
  const pinnings = facts.map((f) => holdPrecheck(f.p, plan.point, holdSettings(plan, f)));
  const open = facts.filter((_, j) => pinnings[j] === null);
  if (open.length > 0) {
    const holds = await runner.map<LandscapeHoldPayload, LandscapeOptionResult['pinning']>(
      LANDSCAPE_HOLD_TASK,
      open.map((f) => ({ landscape: json, pest: plan.point, problem: { ...plan.common, band: f.j }, u: Array.from(f.raw.u), h: Array.from(f.raw.h), hold: { ...holdSettings(plan, f), shouldCancel: undefined } })),
      { signal: settings.signal, key: `${key}:holds:${open.map((f) => f.j).join(',')}` },
    );
    open.forEach((f, i) => (pinnings[f.j] = holds[i]));
  }
  return assemble(plan, base, facts, pinnings as LandscapeOptionResult['pinning'][]);
}
