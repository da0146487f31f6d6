/**
 * One band option against the baseline on the map: per-site arrivals, delays and the way the pest gets past
 * (through the band, around its ends, or not within the horizon), trees removed and cost, and the verdict
 * with its evidence. Split in two around the "holds" check (holds.ts), which may run as a task of its own:
 * `optionFacts` (everything the runs say) and `finishOption` (the verdict and its sentences).
 */
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import type { LandscapeProblem, PointPest, ProblemOptions } from './problem.ts';
import { fringeMatters, minOver, type RawRun } from './run.ts';
import { bandDepth, bottleneckArrival, infestationCentre } from './paths.ts';
import { crossSection, stockingAroundBand } from './cross-section.ts';
import type { HoldSettings } from './holds.ts';
import { mapTransportRisk, type MapTransportRisk } from './transport.ts';
import { makeSurvivalKernel } from '../bypass/bypass.ts';
import type {
  LandscapeOptionResult,
  LandscapeRun,
  LandscapeSettings,
  LandscapeSiteArrival,
  LandscapeSiteVerdict,
  WayPast,
} from './result.ts';
import type { VerdictKind } from '../result.ts';

/** Hectares per m². */
const HA_PER_M2 = 1e-4;
const HOST_CLASS = RASTER_CLASSES.indexOf('host');

/** What every run of one evaluation shares: the map on its model cell, the pest's central values, the settings. */
export interface EvaluationPlan {
  /** The map as given (trees removed are counted on its own cells). */
  landscape: RasterLandscape;
  /** The map on the model cell. */
  l: RasterLandscape;
  point: PointPest;
  settings: LandscapeSettings;
  level: number;
  /** Problem options of every run (the same step for all, so that arrivals compare like with like). */
  common: Omit<ProblemOptions, 'band'> & { stepYears: number };
  notes: string[];
}

export interface BaselineFacts {
  problem: LandscapeProblem;
  raw: RawRun;
  summary: LandscapeRun;
  /** Cells of the infestation (start cells of occupied paths). */
  starts: Int32Array;
}

export interface OptionFacts {
  j: number;
  p: LandscapeProblem;
  raw: RawRun;
  run: LandscapeRun;
  sites: LandscapeSiteVerdict[];
  cells: { total: number; reached: number; core: number; coreReached: number };
  behind: LandscapeSiteVerdict[];
  reachedBehind: LandscapeSiteVerdict[];
  wayPast: WayPast;
  stemsRemoved: number;
  treeCost: number | null;
}

/**
 * How much later than a site's arrival (a, years) an occupied path may reach it and still count as the
 * way there: two steps or 2 % of a. A run that goes on this long past every site's arrival has decided
 * the way past (later passages cannot change it).
 */
export function wayPastToleranceYears(stepYears: number, a: number): number {
  return Math.max(2 * stepYears, 0.02 * a);
}

/** Cells of the infestation (start cells of occupied paths). */
export function startCells(p: LandscapeProblem, level: number): Int32Array {
  const out: number[] = [];
  for (let k = 0; k < p.u0.length; k++) if (p.u0[k] > 0 && p.u0[k] >= Math.min(level, p.u0[k])) out.push(k);
  return Int32Array.from(out);
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

export function summariseRun(p: LandscapeProblem, raw: RawRun, pest: PointPest, option: boolean): LandscapeRun {
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
  const c = infestationCentre(nx, p.u0);
  if (!c) return NaN;
  let best = Infinity;
  for (const k of cells) best = Math.min(best, Math.hypot((k % nx) - c.col, Math.floor(k / nx) - c.row));
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


export function baselineFacts(plan: EvaluationPlan, problem: LandscapeProblem, raw: RawRun): BaselineFacts {
  return { problem, raw, summary: summariseRun(problem, raw, plan.point, false), starts: startCells(problem, plan.level) };
}

/** The kind of a site's outcome and its sentence, from its arrival year without (b) and with (o) the band. */
function siteVerdict(
  b: number | null,
  o: number | null,
  delay: number | null,
  wayPast: WayPast | null,
  stepYears: number,
  horizonYears: number,
  withBand: { fringeOnly?: boolean; detectedYears: number | null },
): { kind: VerdictKind; sentence: string } {
  if (b === null && o === null) return { kind: 'not-reached', sentence: `Not reached within ${horizonYears} years, with or without the band.` };
  if (b === null) return { kind: 'speeds-up', sentence: `Reached in year ${fmt(o!)} with the band, but not within the horizon without it.` };
  if (o === null) {
    let sentence = `Not reached within ${horizonYears} years with the band (year ${fmt(b)} without it).`;
    if (withBand.fringeOnly) sentence += ` The site sees a thin fringe at the detection level from year ${fmt(withBand.detectedYears!)}, but no breeding population forms.`;
    return { kind: 'not-crossed', sentence };
  }
  if (Math.abs(delay!) < Math.max(stepYears, 1e-9)) return { kind: 'no-change', sentence: `Arrives in year ${fmt(o)}, as without the band.` };
  if (delay! > 0) {
    return {
      kind: 'delays',
      sentence: `Arrives ${fmt(delay!)} years later than without the band (year ${fmt(o)} instead of ${fmt(b)})${wayPast ? `, ${wayPast === 'around' ? 'around the band' : 'through the band'}` : ''}.`,
    };
  }
  return { kind: 'speeds-up', sentence: `Arrives ${fmt(-delay!)} years sooner than without the band (year ${fmt(o)} instead of ${fmt(b)}).` };
}

/** Everything the option's run says against the baseline's, before the "holds" check. */
export function optionFacts(plan: EvaluationPlan, base: BaselineFacts, j: number, p: LandscapeProblem, raw: RawRun): OptionFacts {
  const { landscape, l, point, settings } = plan;
  const { stepYears } = plan.common;
  const { raw: baseRaw, starts, summary: baseline } = base;
  const run = summariseRun(p, raw, point, true);
  const bandCells = p.bandAtCells!;
  const tol = (a: number) => wayPastToleranceYears(stepYears, a);
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
    const { kind, sentence } = siteVerdict(b, o, delay, wayPast, stepYears, settings.horizonYears, run.sites[i]);
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
  return { j, p, raw, run, sites, cells, behind, reachedBehind, wayPast, stemsRemoved, treeCost };
}

/** Settings of the option's "holds" check. */
export function holdSettings(plan: EvaluationPlan, f: OptionFacts): HoldSettings {
  return { horizonYears: plan.settings.horizonYears, detectionLevel: plan.level, sitesReached: f.reachedBehind.length > 0, shouldCancel: plan.settings.shouldCancel };
}

/**
 * The option's verdict, sentences and cross-section (bands of the same width, treatment and surrounding
 * stocking share one cross-section analysis through `crossSections`).
 */
export function finishOption(plan: EvaluationPlan, f: OptionFacts, pinning: LandscapeOptionResult['pinning'], crossSections: Map<string, LandscapeOptionResult['crossSection']>): LandscapeOptionResult {
  const { l, point, settings } = plan;
  const { j, p, run, sites, cells, behind, reachedBehind, wayPast, stemsRemoved, treeCost } = f;
  const band = l.bands[j];
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
    transport: settings.transport ? transportRisk(plan, f) : null,
  };
}

/** People carrying the pest past the option's band, from the option run's infested area over time. */
function transportRisk(plan: EvaluationPlan, f: OptionFacts): MapTransportRisk {
  const t = plan.settings.transport!;
  return mapTransportRisk({
    nx: plan.l.nx,
    ny: plan.l.ny,
    cellKm: f.p.mesh.cellKm,
    hostAtCells: f.p.hostAtCells,
    bandAtCells: f.p.bandAtCells!,
    detected: f.raw.detected,
    u0: f.p.u0,
    infestedAtCells: plan.l.infestedAtCells,
    horizonYears: plan.settings.horizonYears,
    ratePerKm2Year: t.ratePerKm2Year,
    establishmentProbability: t.establishmentProbability,
    kernel: makeSurvivalKernel(t.kernel),
  });
}
