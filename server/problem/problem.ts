/**
 * The resolved problem of one run: what every analysis entry works on. Built once per evaluation from a point
 * scenario (central values, or draw i: see resolve.ts), it carries the pest, the transect's extent and ends,
 * the initial infestation, the probes (sites), the detection level, the horizon and the resolution policy's
 * fixed values — and a cache shared by every problem derived from it, so each distinct layout is built once
 * and each distinct discretisation (layout × resolution × ends × start) is made once.
 *
 * Variants derive a new Problem from an old one ({@link deriveProblem}: a window with reflecting cuts, a
 * coarsened resolution for an ensemble draw, a periodic pattern for a mosaic) instead of forging a modified
 * scenario for deeper code to read. `scenario` is the point scenario the problem was built from, for what
 * variants never change (growth form, barrier options, names, costs).
 */
import type { PointScenario } from '../model/scenario.ts';
import { segmentBreaks } from '../model/scenario.ts';
import type { EndCondition } from '../numerics/diffusion.ts';
import type { Grid } from '../numerics/grid.ts';
import type { TransectMesh } from '../domain/transect-mesh.ts';
import { buildLayout, type ClearingSpec, type Piece } from './layout.ts';

/** Cell and step sizes of a run, and whether each was chosen automatically. */
export interface Resolution {
  /** Largest cell [km]. */
  cellKm: number;
  /** Time step [yr]. */
  stepYears: number;
  autoCell: boolean;
  autoStep: boolean;
  /**
   * Relative tolerance of the adaptive integrator (numerics/steppers/): set when the step is automatic, and
   * then `stepYears` is only the output interval at which observers see the state (dense output). Absent:
   * fixed steps of `stepYears` (a user-given or coarsened step).
   */
  tolerance?: number;
}

/** Everything the solver needs, per cell (Float64Array layout: one entry per cell, left to right). */
export interface TransectProblem {
  grid: Grid;
  /** The grid behind the Mesh interface (remap, locate, faces). */
  mesh: TransectMesh;
  pieces: Piece[];
  resolution: Resolution;
  /** D [km²/yr] */
  diffusionAtCells: Float64Array;
  /** rho = w/D */
  residenceAtCells: Float64Array;
  /** Off-host mortality [1/yr] */
  mortalityAtCells: Float64Array;
  /** 1 = host forest */
  hostAtCells: Uint8Array;
  /** Initial host fraction (stocking) */
  stockingAtCells: Float64Array;
  /** Host stems per hectare at the initial stocking */
  stemsAtCells: Float64Array;
  /** Initial insect density */
  u0: Float64Array;
  ends: { left: EndCondition; right: EndCondition };
  perCapita: (u: number, h: number) => number;
  hostKillRate: number;
  stiffness: number;
}

export interface Ends {
  left: EndCondition;
  right: EndCondition;
}

/** Fixed parts of the resolution policy (a user's `numerics`, or a coarsened draw's); automatic where absent. */
export interface ResolutionOverrides {
  /** Cell size [m]. */
  cellM?: number;
  /** Time step [yr]. */
  stepYears?: number;
  /** Relative tolerance of the adaptive time stepping (without a fixed step). */
  tolerance?: number;
}

export interface Problem {
  readonly scenario: PointScenario;
  readonly pest: PointScenario['pest'];
  /** Transect extent [km]: first and last segment break. */
  readonly extentKm: readonly [number, number];
  readonly ends: Ends;
  /** Initial state: density on a stretch of host forest (relative to capacity, times the stocking). */
  readonly infestation: { readonly fromKm: number; readonly toKm: number; readonly density: number };
  /** Probes where arrival times are read. */
  readonly sites: readonly { readonly name: string; readonly atKm: number }[];
  readonly detectionLevel: number;
  /** End of runs that do not set their own [yr]. */
  readonly horizonYears: number;
  readonly numerics: ResolutionOverrides;
  readonly cache: ProblemCache;
}

/** Layouts and discretisations shared by a problem and every problem derived from it. */
export class ProblemCache {
  private readonly layouts = new Map<string, Piece[]>();
  private readonly discretised = new Map<string, TransectProblem>();
  /** Discretisations made (cache misses) and asked for; layouts built. */
  readonly counts = { made: 0, asked: 0, layoutsBuilt: 0 };
  /** Distinct discretisations held. */
  get distinctDiscretisations(): number {
    return this.discretised.size;
  }
  layout(key: string, build: () => Piece[]): Piece[] {
    let l = this.layouts.get(key);
    if (!l) {
      l = build();
      this.counts.layoutsBuilt++;
      this.layouts.set(key, l);
    }
    return l;
  }
  discretisation(key: string, build: () => TransectProblem): TransectProblem {
    this.counts.asked++;
    let d = this.discretised.get(key);
    if (!d) {
      d = build();
      this.counts.made++;
      this.discretised.set(key, d);
    }
    return d;
  }
}

/** Builds the problem of a point scenario (a fresh cache). */
export function buildProblem(s: PointScenario): Problem {
  const breaks = segmentBreaks(s.transect);
  return {
    scenario: s,
    pest: s.pest,
    extentKm: [breaks[0], breaks[breaks.length - 1]],
    ends: s.transect.ends,
    infestation: s.infestation,
    sites: s.sites,
    detectionLevel: s.detectionLevel,
    horizonYears: s.horizonYears,
    numerics: s.numerics,
    cache: new ProblemCache(),
  };
}

export function isProblem(x: PointScenario | Problem): x is Problem {
  return (x as Problem).cache instanceof ProblemCache;
}

/**
 * The problem of an entry's argument. Entries take a Problem; a point scenario is accepted (and gets its own
 * problem and cache) so that tests and scripts can call them directly.
 */
export function asProblem(x: PointScenario | Problem): Problem {
  return isProblem(x) ? x : buildProblem(x);
}

/** What a variant may change. The pest and the scenario it came from never change (the cache relies on it). */
export type ProblemChanges = Partial<Pick<Problem, 'extentKm' | 'ends' | 'infestation' | 'sites' | 'horizonYears' | 'numerics'>>;

/** A variant of a problem sharing its cache. */
export function deriveProblem(p: Problem, changes: ProblemChanges): Problem {
  return { ...p, ...changes };
}

/** Key of a clearing (position, width, cover). */
export function clearingKey(c: ClearingSpec): string {
  return `${c.fromKm}|${c.widthM}|${c.cover}`;
}

/** The layout of the problem's transect with an optional clearing cut into it (built once per clearing). */
export function layoutOf(p: Problem, clearing?: ClearingSpec): Piece[] {
  return p.cache.layout(clearing ? clearingKey(clearing) : 'baseline', () => buildLayout(p.scenario, clearing));
}
