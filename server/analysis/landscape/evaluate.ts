/**
 * Evaluates a landscape map: the baseline and every band option on the 2-D engine, with per-site arrivals
 * and delays, the way the pest gets past each band (through, around, or not within the horizon), trees
 * removed and cost, evidence for "holds", and the band's 1-D cross-section critical width beside it.
 */
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import type { Pest } from '../../model/pest.ts';
import { resolveQuantities } from '../../model/quantity.ts';
import { InputError } from '../../model/errors.ts';
import { CAUTIONS } from '../evaluate/cautions.ts';
import { coarsenLandscape, landscapeProblem, type LandscapeProblem, type PointPest } from './problem.ts';
import { fringeMatters, runLandscapeProblem, type RawRun } from './run.ts';
import { bandDepth, bottleneckArrival } from './paths.ts';
import { crossSection, stockingAroundBand } from './cross-section.ts';
import { verifyHold } from './holds.ts';
import {
  LANDSCAPE_RESULT_VERSION,
  type LandscapeOptionResult,
  type LandscapeResult,
  type LandscapeRun,
  type LandscapeSettings,
  type LandscapeSiteArrival,
  type LandscapeSiteVerdict,
  type WayPast,
} from './result.ts';
import type { VerdictKind } from '../result.ts';

/** Hectares per m². */
const HA_PER_M2 = 1e-4;
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

/** Cells of the infestation (start cells of occupied paths). */
function startCells(p: LandscapeProblem, level: number): Int32Array {
  const out: number[] = [];
  for (let k = 0; k < p.u0.length; k++) if (p.u0[k] > 0 && p.u0[k] >= Math.min(level, p.u0[k])) out.push(k);
  return Int32Array.from(out);
}

function minOver(field: Float32Array | Float64Array, cells: Int32Array): number | null {
  let m = Infinity;
  for (const k of cells) if (field[k] >= 0 && field[k] < m) m = field[k];
  return Number.isFinite(m) ? m : null;
}

/** Site arrivals of a run; in an option run a detected site without a breeding population is a fringe only. */
function siteArrivals(p: LandscapeProblem, raw: RawRun, pest: PointPest, option: boolean): LandscapeSiteArrival[] {
  const fringe = fringeMatters(pest);
  return p.landscape.sites.map((site) => {
    const detectedYears = minOver(raw.detected, site.cells);
    const est = minOver(raw.established, site.cells);
    const breedingYears = fringe ? est : detectedYears;
    return { name: site.name, detectedYears, breedingYears, fringeOnly: option && fringe && detectedYears !== null && est === null };
  });
}

function summariseRun(p: LandscapeProblem, raw: RawRun, pest: PointPest, option: boolean): LandscapeRun {
  let maxYears = -Infinity;
  for (const v of raw.detected) if (v > maxYears) maxYears = v;
  let stems0 = 0;
  let stems1 = 0;
  const cellHa = p.landscape.cellM * p.landscape.cellM * HA_PER_M2;
  for (let k = 0; k < p.hostAtCells.length; k++) {
    if (!p.hostAtCells[k] || !(p.stockingAtCells[k] > 0)) continue;
    const stems = p.landscape.stemsAtCells[k] * cellHa;
    stems0 += stems;
    stems1 += (stems * raw.h[k]) / p.stockingAtCells[k];
  }
  return {
    arrival: { years: raw.detected, maxYears: Number.isFinite(maxYears) ? maxYears : null },
    sites: siteArrivals(p, raw, pest, option),
    series: raw.series,
    host: { shareRemaining: stems0 > 0 ? stems1 / stems0 : 1, stemsKilled: stems0 - stems1 },
    endYears: raw.endYears,
    numerics: raw.numerics,
  };
}

/** The arrival used for verdicts: the detection year, except a fringe that never breeds (not an arrival). */
function verdictArrival(a: LandscapeSiteArrival): number | null {
  return a.fringeOnly ? null : a.detectedYears;
}

function fmt(y: number): string {
  return y.toFixed(1);
}

/** Distance from the infestation's centroid to a site's nearest cell [km]. */
function distanceKm(p: LandscapeProblem, cells: Int32Array): number {
  const { nx } = p.landscape;
  let sx = 0;
  let sy = 0;
  let m = 0;
  for (let k = 0; k < p.u0.length; k++) {
    if (p.u0[k] > 0) {
      sx += (k % nx) * p.u0[k];
      sy += Math.floor(k / nx) * p.u0[k];
      m += p.u0[k];
    }
  }
  if (!(m > 0)) return NaN;
  let best = Infinity;
  for (const k of cells) best = Math.min(best, Math.hypot((k % nx) - sx / m, Math.floor(k / nx) - sy / m));
  return best * p.mesh.cellKm;
}

/**
 * True when the straight line from the infested cell nearest to the site (to the site's nearest cell)
 * passes through a band cell (sampled every quarter cell).
 */
export function lineCrossesBand(nx: number, starts: Int32Array, siteCells: Int32Array, band: Uint8Array): boolean {
  let best = Infinity;
  let from = -1;
  let to = -1;
  for (const s of starts) {
    const sr = Math.floor(s / nx);
    const sq = s - sr * nx;
    for (const k of siteCells) {
      const d = Math.hypot(Math.floor(k / nx) - sr, (k % nx) - sq);
      if (d < best) (best = d), (from = s), (to = k);
    }
  }
  if (from < 0) return false;
  const r0 = Math.floor(from / nx) + 0.5;
  const q0 = (from % nx) + 0.5;
  const r1 = Math.floor(to / nx) + 0.5;
  const q1 = (to % nx) + 0.5;
  const n = Math.ceil(4 * best) + 1;
  for (let i = 0; i <= n; i++) {
    const r = Math.floor(r0 + ((r1 - r0) * i) / n);
    const q = Math.floor(q0 + ((q1 - q0) * i) / n);
    if (band[r * nx + q]) return true;
  }
  return false;
}

export interface EvaluateRuns {
  baseline: { problem: LandscapeProblem; raw: RawRun };
  options: { problem: LandscapeProblem; raw: RawRun }[];
}

/**
 * Evaluates the landscape for the pest (central values of any distributions) over the horizon.
 * @throws InputError for settings out of range (field, value and allowed range named)
 * @throws CancelledError when `shouldCancel` returned true
 */
export function evaluateLandscape(landscape: RasterLandscape, pest: Pest | PointPest, settings: LandscapeSettings): LandscapeResult {
  checkSettings(landscape, settings);
  const point = resolveQuantities(pest) as PointPest;
  const factor = cellFactor(landscape, settings.cellM);
  const l = coarsenLandscape(landscape, factor);
  const level = settings.detectionLevel ?? 0.01;
  const mapEdges = settings.mapEdges ?? 'reflecting';
  const common = { mapEdges, infestedDensity: settings.infestedDensity ?? 1, stepYears: settings.stepYears, horizonYears: settings.horizonYears, detectionLevel: settings.detectionLevel };
  const nRuns = 1 + l.bands.length;
  const progress = (run: number, what: string) => (f: number) => settings.onProgress?.((run + f) / (nRuns + 0.5), what);
  const notes: string[] = [];
  if (factor > 1) notes.push(`The map (${landscape.cellM} m cells) was averaged onto ${l.cellM} m model cells.`);

  const baseProblem = landscapeProblem(l, point, common);
  // All runs share the baseline's step so that arrivals compare like with like.
  const stepYears = settings.stepYears ?? Math.min(baseProblem.stepYears, ...l.bands.map((_, j) => landscapeProblem(l, point, { ...common, band: j }).stepYears));
  const base = stepYears === baseProblem.stepYears ? baseProblem : landscapeProblem(l, point, { ...common, stepYears });
  const runSettings = { horizonYears: settings.horizonYears, detectionLevel: level, shouldCancel: settings.shouldCancel };
  const baseRaw = runLandscapeProblem(base, point, { ...runSettings, onProgress: progress(0, 'baseline') });
  const baseline = summariseRun(base, baseRaw, point, false);
  const starts = startCells(base, level);

  const crossSections = new Map<string, LandscapeOptionResult['crossSection']>();
  const options: LandscapeOptionResult[] = l.bands.map((band, j) => {
    const p = landscapeProblem(l, point, { ...common, stepYears, band: j });
    const raw = runLandscapeProblem(p, point, { ...runSettings, onProgress: progress(1 + j, band.label) });
    const run = summariseRun(p, raw, point, true);
    const bandCells = p.bandAtCells!;
    const tol = (a: number) => Math.max(2 * stepYears, 0.02 * a);
    // Behind the band: in the baseline, every occupied path avoiding the band's cells reached the site later.
    const baseAround = bottleneckArrival(l.nx, baseRaw.detected, starts, bandCells);
    const optAround = bottleneckArrival(l.nx, raw.detected, starts, bandCells);
    // Trees removed: band share × host stems of each cell (exact cover, not the model's band cells).
    const cellHa = landscape.cellM * landscape.cellM * HA_PER_M2;
    let stemsRemoved = 0;
    const fine = landscape.bands[j];
    for (let k = 0; k < fine.cover.length; k++) if (landscape.classAtCells[k] === HOST_CLASS) stemsRemoved += fine.cover[k] * landscape.stemsAtCells[k] * cellHa;
    const treeCost = settings.costPerStem !== undefined ? stemsRemoved * settings.costPerStem : null;

    const sites: LandscapeSiteVerdict[] = l.sites.map((site, i) => {
      const b = verdictArrival(baseline.sites[i]);
      const o = verdictArrival(run.sites[i]);
      // Behind the band: the straight line from the nearest infested cell crosses it, or (for a winding
      // way) in the baseline every occupied path avoiding the band's cells reached the site later.
      const behindBand =
        lineCrossesBand(l.nx, starts, site.cells, bandCells) ||
        (b !== null && !((minOver(baseAround, site.cells) ?? Infinity) <= b + tol(b)));
      let wayPast: WayPast | null = null;
      if (behindBand && o !== null) wayPast = (minOver(optAround, site.cells) ?? Infinity) <= o + tol(o) ? 'around' : 'through';
      const delay = b !== null && o !== null ? o - b : null;
      let kind: VerdictKind;
      let sentence: string;
      if (b === null && o === null) {
        kind = 'not-reached';
        sentence = `Not reached within ${settings.horizonYears} years, with or without the band.`;
      } else if (b === null) {
        kind = 'speeds-up';
        sentence = `Reached in year ${fmt(o!)} with the band, but not within the horizon without it.`;
      } else if (o === null) {
        kind = 'not-crossed';
        sentence = `Not reached within ${settings.horizonYears} years with the band (year ${fmt(b)} without it).`;
        if (run.sites[i].fringeOnly) sentence += ` The site sees a thin fringe at the detection level from year ${fmt(run.sites[i].detectedYears!)}, but no breeding population forms.`;
      } else if (Math.abs(delay!) < Math.max(stepYears, 1e-9)) {
        kind = 'no-change';
        sentence = `Arrives in year ${fmt(o)}, as without the band.`;
      } else if (delay! > 0) {
        kind = 'delays';
        sentence = `Arrives ${fmt(delay!)} years later than without the band (year ${fmt(o)} instead of ${fmt(b)})${wayPast ? `, ${wayPast === 'around' ? 'around the band' : 'through the band'}` : ''}.`;
      } else {
        kind = 'speeds-up';
        sentence = `Arrives ${fmt(-delay!)} years sooner than without the band (year ${fmt(o)} instead of ${fmt(b)}).`;
      }
      return {
        name: site.name,
        behindBand,
        baselineArrivalYears: b,
        optionArrivalYears: o,
        delayYears: delay,
        wayPast,
        kind,
        sentence,
        costPerYearOfDelay: treeCost !== null && delay !== null && delay > 0 ? treeCost / delay : null,
      };
    });

    // Band cells reached, and its core (the cells farthest from its rim).
    const depth = bandDepth(l.nx, bandCells);
    let maxDepth = 0;
    for (const d of depth) if (d > maxDepth) maxDepth = d;
    const coreDepth = Math.max(1, Math.ceil(maxDepth / 2));
    const cells = { total: 0, reached: 0, core: 0, coreReached: 0 };
    for (let k = 0; k < bandCells.length; k++) {
      if (!bandCells[k]) continue;
      cells.total++;
      const reached = raw.detected[k] >= 0;
      if (reached) cells.reached++;
      if (depth[k] >= coreDepth) {
        cells.core++;
        if (reached) cells.coreReached++;
      }
    }

    const behind = sites.filter((s) => s.behindBand);
    const reachedBehind = behind.filter((s) => s.optionArrivalYears !== null).sort((a, b) => a.optionArrivalYears! - b.optionArrivalYears!);
    const wayPast: WayPast = reachedBehind.length > 0 ? reachedBehind[0].wayPast ?? 'none' : 'none';
    const pinning = verifyHold(p, raw, point, { horizonYears: settings.horizonYears, detectionLevel: level, sitesReached: reachedBehind.length > 0, shouldCancel: settings.shouldCancel });
    let wayPastSentence: string;
    if (behind.length === 0) wayPastSentence = 'No protected site lies behind the band: the pest reaches them without needing to pass it.';
    else if (wayPast === 'none') {
      wayPastSentence = pinning.verified
        ? 'The pest does not get past the band: the front is held (verified steady state).'
        : `The pest does not get past the band within ${settings.horizonYears} years (not shown to hold beyond that).`;
    } else if (wayPast === 'around') wayPastSentence = `The pest gets around the band's ends: it reached ${reachedBehind[0].name} in year ${fmt(reachedBehind[0].optionArrivalYears!)} along occupied forest that avoids the band.`;
    else wayPastSentence = `The pest gets through the band: it reached ${reachedBehind[0].name} in year ${fmt(reachedBehind[0].optionArrivalYears!)} only by way of band cells (${cells.coreReached} of the band's ${cells.core} core cells were reached).`;

    let kind: VerdictKind;
    if (pinning.verified) kind = 'holds';
    else if (sites.some((s) => s.kind === 'speeds-up')) kind = 'speeds-up';
    else if (behind.some((s) => s.kind === 'delays')) kind = 'delays';
    else if (behind.some((s) => s.kind === 'not-crossed')) kind = 'not-crossed';
    else if (sites.some((s) => s.kind === 'delays')) kind = 'delays';
    else if (sites.every((s) => s.kind === 'not-reached')) kind = 'not-reached';
    else kind = 'no-change';
    const verdictSentence: Record<VerdictKind, string> = {
      holds: 'Holds: the front stops at the band (verified steady state of the map equations).',
      marginal: 'Marginal: cannot be called either way.',
      'not-crossed': `Not crossed within ${settings.horizonYears} years: not shown to hold beyond the horizon.`,
      delays: `Delays the pest${wayPast !== 'none' ? ` (it gets ${wayPast === 'around' ? 'around' : 'through'} the band)` : ''}.`,
      'speeds-up': 'Speeds the pest up: it arrives sooner at a protected site than without the band.',
      'no-change': 'Makes no difference to when the pest arrives.',
      'not-reached': `No protected site is reached within ${settings.horizonYears} years, with or without the band.`,
    };
    // Bands of the same width, treatment and surrounding stocking share one cross-section analysis.
    const cachedCrossSection = () => {
      const key = `${band.widthM}|${band.treatment}|${stockingAroundBand(p).toFixed(3)}`;
      if (!crossSections.has(key)) crossSections.set(key, crossSection(l, p, point, band, settings));
      return crossSections.get(key)!;
    };
    const dBase = reachedBehind[0] ? distanceKm(p, l.sites[sites.indexOf(reachedBehind[0])].cells) : NaN;
    const first = reachedBehind[0];
    return {
      id: band.id,
      label: band.label,
      treatment: band.treatment,
      areaM2: band.areaM2,
      modelAreaM2: cells.total * l.cellM * l.cellM,
      run,
      verdict: { kind, sentence: verdictSentence[kind], why: wayPastSentence },
      wayPast,
      wayPastSentence,
      bandCells: cells,
      pinning,
      sites,
      trees: { stemsRemoved, cost: treeCost, costUnit: settings.costUnit ?? null },
      speeds: {
        baselineKmPerYear: first && first.baselineArrivalYears ? dBase / first.baselineArrivalYears : null,
        optionKmPerYear: first && first.optionArrivalYears ? dBase / first.optionArrivalYears : null,
      },
      crossSection: settings.crossSection === false ? null : cachedCrossSection(),
    };
  });
  if (settings.crossSection === false) notes.push('The bands’ 1-D cross-section critical widths were not computed (switched off).');
  settings.onProgress?.(1, 'done');
  return {
    resultVersion: LANDSCAPE_RESULT_VERSION,
    kind: 'landscape',
    grid: { nx: l.nx, ny: l.ny, cellM: l.cellM, originXM: l.originXM, originYM: l.originYM, crs: l.crs },
    horizonYears: settings.horizonYears,
    detectionLevel: level,
    edges: { mapEdges, outside: l.outside },
    baseline,
    options,
    ensemble: null,
    cautions: [...LANDSCAPE_LIMITS, ...CAUTIONS],
    notes,
  };
}
