/**
 * The full-model fit: the engine's predicted detection pattern against the records (binomial likelihood,
 * likelihood.ts), maximised over the movement rate D for each point of a small grid of the other fitted
 * parameters (growth rate, edge preference: their prior's quantiles), with the start year and the detection
 * chance profiled out at every run. For each grid point the profile of ln D gives the best D and its 90 %
 * profile-likelihood interval {D : 2(ℓ̂ − ℓ_p(D)) ≤ χ²₁(0.90)} (Wilks 1938; Venzon & Moolgavkar 1988 for the
 * root search of the ends). An end not reached inside the searched range is reported open: the records do
 * not bound D on that side.
 */
import type { PointScenario } from '../../model/scenario.ts';
import { FIELDS } from '../../model/fields.ts';
import { InputError } from '../../model/errors.ts';
import { goldenSectionMin } from '../../numerics/minimise.ts';
import { buildLayout } from '../../problem/layout.ts';
import { chooseResolution, type Resolution } from '../../problem/discretise.ts';
import { CHI2_1_90 } from './statistics.ts';
import { fitNuisance, simulateAtPositions, type NuisanceFit, type RecordArrays, type StartStretch } from './likelihood.ts';

/** A parameter held on a grid while D is profiled. */
export interface GridParameter {
  path: (string | number)[];
  values: number[];
}

export interface ModelFitSettings {
  start: StartStretch;
  /** Earliest start year allowed, as years before the first survey year. */
  leadYears: number;
  /** First survey year. */
  firstYear: number;
  /** Last survey year. */
  lastYear: number;
  /** D values the first search must cover [km²/yr] (the front estimate and the scenario's central value). */
  initialDiffusion: number | number[];
  grid: GridParameter[];
  /** Cells and steps this many times the automatic choice at the initial D (default 2). */
  resolutionFactor?: number;
  /** Largest number of engine runs (default 4000): the fit stops with a clear message beyond it. */
  maxRuns?: number;
  shouldCancel?: () => boolean;
  onProgress?: (fraction: number) => void;
}

/** One likelihood evaluation: a run at one D (and grid point), nuisance parameters profiled out. */
export interface Evaluation extends NuisanceFit {
  diffusion: number;
}

export interface ConditionalProfile {
  /** Values of the grid parameters (settings.grid order). */
  gridValues: number[];
  best: Evaluation;
  /** 90 % profile-likelihood interval of D [km²/yr]. */
  interval90: [number, number];
  /** The interval reaches the searched range's end on that side (D not bounded there by the records). */
  lowerOpen: boolean;
  upperOpen: boolean;
  evaluations: Evaluation[];
}

export interface ModelFitOutcome {
  profiles: ConditionalProfile[];
  runs: number;
  wallMs: number;
  resolution: Resolution;
}

/** Copy of a point scenario with one number replaced at a path. */
export function withValue(s: PointScenario, path: readonly (string | number)[], value: number): PointScenario {
  const copy = structuredClone(s) as unknown as Record<string | number, unknown>;
  let cur = copy;
  for (let i = 0; i < path.length - 1; i++) cur = cur[path[i]] as Record<string | number, unknown>;
  cur[path[path.length - 1]] = value;
  return copy as unknown as PointScenario;
}

/** Half-width of the first search in ln D: a factor of 5 either side of the initial D. */
const FIRST_SPAN = Math.log(5);
/** Points of the first grid in ln D (a step of ln 1.5), and at most this many when anchors lie far apart. */
const FIRST_POINTS = 9;
const MAX_FIRST_POINTS = 21;
/** Widening steps allowed when the best D is at the grid's end. */
const MAX_WIDENINGS = 3;
/** Bisection steps for each interval end (ln D to ≈ 0.3 % of a grid step). */
const END_BISECTIONS = 8;
const LN_D_MIN = Math.log(1e-5);
const LN_D_MAX = Math.log(FIELDS.diffusionHost.max);

/**
 * Profiles ln D for one grid point.
 * @param evaluate - the log-likelihood of a run at D = e^x (nuisance parameters profiled out)
 * @param initialDiffusion - D value(s) the first grid must cover [km²/yr]
 */
export function profileDiffusion(evaluate: (diffusion: number) => Evaluation, initialDiffusion: number | number[]): Omit<ConditionalProfile, 'gridValues'> {
  const cache = new Map<number, Evaluation>();
  const at = (x: number): Evaluation => {
    const key = Math.round(x * 1e9);
    let e = cache.get(key);
    if (!e) cache.set(key, (e = evaluate(Math.exp(x))));
    return e;
  };
  const h = (2 * FIRST_SPAN) / (FIRST_POINTS - 1);
  // The first grid covers every anchor (front estimate, the scenario's value) with a factor of 5 to spare.
  const anchors = (Array.isArray(initialDiffusion) ? initialDiffusion : [initialDiffusion]).filter((d) => d > 0 && Number.isFinite(d)).map(Math.log);
  const a = Math.max(LN_D_MIN, Math.min(...anchors) - FIRST_SPAN);
  const b = Math.min(LN_D_MAX, Math.max(...anchors) + FIRST_SPAN);
  const nFirst = Math.min(MAX_FIRST_POINTS, Math.max(FIRST_POINTS, Math.ceil((b - a) / h) + 1));
  let xs = Array.from({ length: nFirst }, (_, k) => a + ((b - a) * k) / (nFirst - 1));
  xs.forEach(at);
  for (let w = 0; w < MAX_WIDENINGS; w++) {
    const best = argmax(xs.map((x) => at(x).logLik));
    if (best === 0 && xs[0] - h >= LN_D_MIN) xs = [...Array.from({ length: 4 }, (_, k) => xs[0] - (4 - k) * h).filter((x) => x >= LN_D_MIN), ...xs];
    else if (best === xs.length - 1 && xs[xs.length - 1] + h <= LN_D_MAX) xs = [...xs, ...Array.from({ length: 4 }, (_, k) => xs[xs.length - 1] + (k + 1) * h).filter((x) => x <= LN_D_MAX)];
    else break;
    xs.forEach(at);
  }
  const k = argmax(xs.map((x) => at(x).logLik));
  const lo = xs[Math.max(0, k - 1)];
  const hi = xs[Math.min(xs.length - 1, k + 1)];
  if (hi > lo) goldenSectionMin((x) => -at(x).logLik, lo, hi, 0.004, 20);
  const all = () => [...cache.entries()].map(([key, e]) => ({ x: key / 1e9, e })).sort((a, b) => a.x - b.x);
  const top = all().reduce((a, b) => (b.e.logLik > a.e.logLik ? b : a));
  const dev = (x: number) => 2 * (top.e.logLik - at(x).logLik);
  const xHat = top.x;
  const end = (side: -1 | 1): { x: number; open: boolean } => {
    const pts = all().filter((p) => (side < 0 ? p.x < xHat : p.x > xHat));
    const ordered = side < 0 ? pts.reverse() : pts;
    let inside = xHat;
    for (const p of ordered) {
      if (2 * (top.e.logLik - p.e.logLik) > CHI2_1_90) {
        let a = inside;
        let b = p.x;
        for (let it = 0; it < END_BISECTIONS; it++) {
          const m = 0.5 * (a + b);
          if (dev(m) > CHI2_1_90) b = m;
          else a = m;
        }
        // Linear interpolation of the deviance between the last two points.
        const da = dev(a);
        const db = dev(b);
        return { x: db > da ? a + ((CHI2_1_90 - da) / (db - da)) * (b - a) : 0.5 * (a + b), open: false };
      }
      inside = p.x;
    }
    return { x: inside, open: true };
  };
  const left = end(-1);
  const right = end(1);
  const best = all().reduce((a, b) => (b.e.logLik > a.e.logLik ? b : a)).e;
  return {
    best,
    interval90: [Math.exp(left.x), Math.exp(right.x)],
    lowerOpen: left.open,
    upperOpen: right.open,
    evaluations: all().map((p) => p.e),
  };
}

function argmax(v: readonly number[]): number {
  let k = 0;
  for (let i = 1; i < v.length; i++) if (v[i] > v[k]) k = i;
  return k;
}

/** Every combination of the grid parameters' values (the first varies slowest). */
function combinations(grid: readonly GridParameter[]): number[][] {
  let out: number[][] = [[]];
  for (const g of grid) out = out.flatMap((c) => g.values.map((v) => [...c, v]));
  return out;
}

/**
 * Runs the full-model fit.
 * @throws InputError when the fit would exceed its run budget or is cancelled
 */
export function fitModel(s: PointScenario, rec: RecordArrays, settings: ModelFitSettings): ModelFitOutcome {
  const started = performance.now();
  const factor = settings.resolutionFactor ?? 2;
  const maxRuns = settings.maxRuns ?? 4000;
  // One grid and step for every trial value: the automatic choice at the initial D and the largest grid values.
  const anchors = [settings.initialDiffusion].flat().filter((d) => d > 0 && Number.isFinite(d));
  // The geometric middle of the anchors: neither a wild front estimate nor a wild guess sets the grid alone.
  let ref = withValue(s, ['pest', 'diffusionHost'], Math.exp(anchors.reduce((a, d) => a + Math.log(d), 0) / anchors.length));
  for (const g of settings.grid) ref = withValue(ref, g.path, g.path[g.path.length - 1] === 'rate' || g.path[g.path.length - 1] === 'birthRate' ? Math.max(...g.values) : g.values[Math.floor(g.values.length / 2)]);
  const auto = chooseResolution(ref, buildLayout(ref));
  const resolution: Resolution = { ...auto, cellKm: auto.cellKm * (auto.autoCell ? factor : 1), stepYears: auto.stepYears * (auto.autoStep ? factor : 1) };
  const earliest = settings.firstYear - settings.leadYears;
  const years = settings.lastYear - earliest;
  const combos = combinations(settings.grid);
  let runs = 0;
  const profiles: ConditionalProfile[] = combos.map((values, c) => {
    let point = s;
    settings.grid.forEach((g, i) => (point = withValue(point, g.path, values[i])));
    const evaluate = (d: number): Evaluation => {
      if (++runs > maxRuns) {
        throw new InputError('FIT_TOO_LARGE', [{ path: 'records', value: rec.year.length, message: `the fit needed more than ${maxRuns} model runs; fit fewer parameters (give the growth rate or edge preference as a number) or a shorter transect` }]);
      }
      if (settings.shouldCancel?.()) throw new InputError('FIT_CANCELLED', [{ path: '', value: runs, message: 'the fit was cancelled or ran out of computing time' }]);
      const series = simulateAtPositions(withValue(point, ['pest', 'diffusionHost'], d), settings.start, rec.positionsKm, years, resolution);
      return { diffusion: d, ...fitNuisance(series, rec, s.detectionLevel, earliest, settings.firstYear) };
    };
    const p = profileDiffusion(evaluate, settings.initialDiffusion);
    settings.onProgress?.((c + 1) / combos.length);
    return { gridValues: values, ...p };
  });
  return { profiles, runs, wallMs: performance.now() - started, resolution };
}
