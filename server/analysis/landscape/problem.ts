/**
 * A landscape resolved for the 2-D engine: the map on the model cell (area-averaged), each class's
 * movement, edge weight and mortality from the transect's habitat rules (model/habitat.ts — one concept,
 * not a copy), a band option cut in, and the initial state.
 */
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import { makeRasterMesh, type RasterMesh } from '../../domain/raster-mesh.ts';
import { habitatCoefficients } from '../../model/habitat.ts';
import { perCapitaRate, reactionStiffness, lowDensityRate } from '../../model/growth.ts';
import type { Habitat, PointScenario } from '../../model/scenario.ts';
import { LimitError } from '../../model/errors.ts';
import { makeRasterOperator, type RasterOperator } from '../../numerics/raster/operator.ts';
import { makeRasterStepper, type RasterStepper } from '../../numerics/raster/stepper.ts';
import { windowFloor } from '../../numerics/steppers/adaptive-loop.ts';
import { chooseResolution, growthRateScale } from '../../problem/discretise.ts';
import type { Piece } from '../../problem/layout.ts';

export type PointPest = PointScenario['pest'];

const HOST = RASTER_CLASSES.indexOf('host');
const NONHOST = RASTER_CLASSES.indexOf('nonhost');
const OPEN = RASTER_CLASSES.indexOf('open');
const OUTSIDE = RASTER_CLASSES.indexOf('outside');

/** The transect habitat of each raster class ('outside' has none). */
export const CLASS_HABITAT: Record<number, Habitat> = { [HOST]: 'host-forest', [NONHOST]: 'non-host-forest', [OPEN]: 'clearing' };

/** Largest number of map cells a run may use (the limit). */
export const MAX_MAP_CELLS = 2_000_000;
/** Largest number of steps a run may take. */
export const MAX_MAP_STEPS = 2_000_000;
/** A cell counts as band when at least this share of it lies inside the band. */
export const BAND_CELL_SHARE = 0.5;

/**
 * The map on a cell `factor` times larger (area averages; the class of a coarse cell is the class with the
 * largest inside area, 'outside' when less than half of it is inside the map's habitat). Sites keep every
 * coarse cell any of their cells falls in; band covers and the infested share are area shares.
 */
export function coarsenLandscape(l: RasterLandscape, factor: number): RasterLandscape {
  const f = Math.max(1, Math.round(factor));
  if (f === 1) return l;
  const nx = Math.ceil(l.nx / f);
  const ny = Math.ceil(l.ny / f);
  const n = nx * ny;
  const classAtCells = new Uint8Array(n);
  const hostCoverAtCells = new Float32Array(n);
  const stemsAtCells = new Float32Array(n);
  const infestedAtCells = new Float32Array(n);
  const bandCovers = l.bands.map(() => new Float32Array(n));
  const area = f * f;
  const counts = new Float64Array(4);
  for (let R = 0; R < ny; R++) {
    for (let C = 0; C < nx; C++) {
      const K = R * nx + C;
      counts.fill(0);
      let host = 0;
      let stems = 0;
      let inf = 0;
      const bands = l.bands.map(() => 0);
      for (let r = R * f; r < Math.min(l.ny, (R + 1) * f); r++) {
        for (let q = C * f; q < Math.min(l.nx, (C + 1) * f); q++) {
          const k = r * l.nx + q;
          const cls = l.classAtCells[k];
          counts[cls]++;
          if (cls !== OUTSIDE) {
            host += l.hostCoverAtCells[k];
            stems += l.stemsAtCells[k];
          }
          inf += l.infestedAtCells[k];
          l.bands.forEach((b, j) => (bands[j] += b.cover[k]));
        }
      }
      const inside = counts[HOST] + counts[NONHOST] + counts[OPEN];
      let cls = OUTSIDE;
      if (inside >= area / 2) {
        cls = HOST;
        if (counts[NONHOST] > counts[cls]) cls = NONHOST;
        if (counts[OPEN] > counts[cls]) cls = OPEN;
      }
      classAtCells[K] = cls;
      if (cls !== OUTSIDE) {
        // Host share and stems per ha of the whole coarse cell (outside parts carry none).
        hostCoverAtCells[K] = host / area;
        stemsAtCells[K] = stems / area;
        infestedAtCells[K] = inf / area;
      }
      bands.forEach((s, j) => (bandCovers[j][K] = s / area));
    }
  }
  const coarseCell = (k: number) => Math.floor(Math.floor(k / l.nx) / f) * nx + Math.floor((k % l.nx) / f);
  return {
    nx,
    ny,
    cellM: l.cellM * f,
    originXM: l.originXM,
    originYM: l.originYM,
    crs: l.crs,
    classAtCells,
    hostCoverAtCells,
    stemsAtCells,
    outside: l.outside,
    infestedAtCells,
    sites: l.sites.map((s) => ({ name: s.name, cells: Int32Array.from(new Set(Array.from(s.cells, coarseCell))) })),
    bands: l.bands.map((b, j) => ({ ...b, cover: bandCovers[j] })),
  };
}

/**
 * The map's automatic step as a multiple of the transect's rule (0.05 / fastest rate, resolution.ts). The map
 * step is second order in time (tests/verification/landscape-numerics.test.ts), and at twice the transect's
 * step its arrival years stay within 0.03 yr of a run with a step four times smaller — the transect rule's
 * own acceptance bound (tests/analysis/landscape/step-rule.test.ts) — while a 100 m cell alone moves the
 * front's arrival by about a tenth of a year (one cell at 1 km/yr). Measured on the bench map at 100 m
 * (r = 0.8/yr, step 0.125 yr): sites within 0.017 yr, every cell within 0.031 yr of a 1/64-yr step; at 0.25 yr
 * the cells drift by 0.084 yr, so the factor stops at 2.
 */
export const MAP_STEP_FACTOR = 2;

/** Automatic time step of a map run for the habitats present [yr]: MAP_STEP_FACTOR × the transect's rule. */
export function mapStepYears(pest: PointPest, habitats: Iterable<Habitat>): number {
  return MAP_STEP_FACTOR * automaticStepYears(pest, habitats);
}

/** Time step of the transect's automatic rule for the habitats present [yr]. */
export function automaticStepYears(pest: PointPest, habitats: Iterable<Habitat>): number {
  const pieces = [...new Set(habitats)].map((habitat) => ({ habitat }) as Piece);
  const s = { pest, numerics: {} } as unknown as PointScenario;
  return chooseResolution(s, pieces.length > 0 ? pieces : [{ habitat: 'host-forest' } as Piece]).stepYears;
}

/** Everything one 2-D run needs. All per-cell arrays are raster arrays (length nx·ny, row 0 north). */
export interface LandscapeProblem {
  landscape: RasterLandscape;
  mesh: RasterMesh;
  op: RasterOperator;
  /** Class per cell after the band (if any) is cut in. */
  classAtCells: Uint8Array;
  /** 1 where the cell belongs to the band option of this problem. */
  bandAtCells: Uint8Array | null;
  hostAtCells: Uint8Array;
  mortalityAtCells: Float64Array;
  /** Initial host fraction (stocking = host cover share). */
  stockingAtCells: Float64Array;
  /** Initial insect density. */
  u0: Float64Array;
  stepYears: number;
  perCapita: (u: number, h: number) => number;
  hostKillRate: number;
  stiffness: number;
  activeFloor: number;
  pad: number;
}

export interface ProblemOptions {
  mapEdges: 'reflecting' | 'lethal';
  infestedDensity: number;
  stepYears?: number;
  horizonYears: number;
  /** Detection level [relative density] (default 0.01): sets the active window's floor for pulled fronts. */
  detectionLevel?: number;
  /** Index into landscape.bands of the option to cut in (none for the baseline). */
  band?: number;
}

/** The map's classes with an option's band cut in, and the band's cells (null for the baseline). */
export function cutBand(l: RasterLandscape, bandIndex: number | undefined): { classAtCells: Uint8Array; bandAtCells: Uint8Array | null } {
  const n = l.nx * l.ny;
  const classAtCells = Uint8Array.from(l.classAtCells);
  if (bandIndex === undefined) return { classAtCells, bandAtCells: null };
  const band = l.bands[bandIndex];
  const into = band.treatment === 'clearing' ? OPEN : NONHOST;
  const bandAtCells = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    if (classAtCells[k] !== OUTSIDE && band.cover[k] >= BAND_CELL_SHARE) {
      classAtCells[k] = into;
      bandAtCells[k] = 1;
    }
  }
  return { classAtCells, bandAtCells };
}

/** The habitats of a map's cells (outside cells have none): what the automatic step depends on. */
export function habitatsOf(classAtCells: Uint8Array): Set<Habitat> {
  const classes = new Set<number>(classAtCells);
  classes.delete(OUTSIDE);
  return new Set([...classes].map((c) => CLASS_HABITAT[c]));
}

/**
 * Resolves a landscape (already on the model cell) for one run.
 * @throws LimitError when the map has too many cells or the run would take too many steps
 */
export function landscapeProblem(l: RasterLandscape, pest: PointPest, o: ProblemOptions): LandscapeProblem {
  const n = l.nx * l.ny;
  if (n > MAX_MAP_CELLS) {
    throw new LimitError([{ path: 'numerics.cellM', value: l.cellM, message: `gives ${n} map cells; the limit is ${MAX_MAP_CELLS}. Use a larger cell` }]);
  }
  const { classAtCells, bandAtCells } = cutBand(l, o.band);
  const mesh = makeRasterMesh(l, classAtCells, l.outside, o.mapEdges);
  const diffusion = new Float64Array(mesh.nCells);
  const residence = new Float64Array(mesh.nCells);
  const hostAtCells = new Uint8Array(n);
  const mortalityAtCells = new Float64Array(n);
  const stockingAtCells = new Float64Array(n);
  const u0 = new Float64Array(n);
  const byClass = new Map<number, ReturnType<typeof habitatCoefficients>>();
  for (let c = 0; c < mesh.nCells; c++) {
    const k = mesh.rasterOfCell[c];
    const cls = classAtCells[k];
    let coef = byClass.get(cls);
    if (!coef) {
      coef = habitatCoefficients(pest, CLASS_HABITAT[cls]);
      byClass.set(cls, coef);
    }
    diffusion[c] = coef.diffusion;
    residence[c] = coef.residence;
    mortalityAtCells[k] = coef.mortality;
    if (coef.host) {
      hostAtCells[k] = 1;
      const s = Math.min(1, Math.max(0, l.hostCoverAtCells[k]));
      stockingAtCells[k] = s;
      u0[k] = o.infestedDensity * Math.min(1, Math.max(0, l.infestedAtCells[k])) * s;
    }
  }
  const op = makeRasterOperator(mesh, diffusion, residence);
  const stepYears = o.stepYears ?? mapStepYears(pest, habitatsOf(classAtCells));
  const steps = o.horizonYears / stepYears;
  if (steps > MAX_MAP_STEPS) {
    throw new LimitError([{ path: 'horizonYears', value: o.horizonYears, message: `needs ${Math.round(steps)} time steps; the limit is ${MAX_MAP_STEPS}` }]);
  }
  const g = pest.growth;
  // Window floor. Pulled (KPP-type) fronts are driven by their leading edge: a density left out below ε grows
  // at most like ε·e^{ΛT} over the horizon T (Λ the low-density growth rate; the maximum-principle bound of
  // numerics/steppers/adaptive-loop.ts `windowFloor`), so ε = 1e-6 · level · e^{−ΛT} moves no passage of the
  // detection level by more than 1e-6 of the level. (A cut-off kept for ever slows a pulled front by about
  // π²/ln²ε relative — Brunet & Derrida 1997, Phys. Rev. E 56:2597 — an asymptotic effect that the bound over
  // the finite horizon already contains.) Pushed (Allee) fronts do not depend on the far tail: 1e-15.
  const lowRate = lowDensityRate(g, 1);
  const pulled = lowRate > 0;
  const movementKm = Math.sqrt(pest.diffusionHost / growthRateScale(g));
  return {
    landscape: l,
    mesh,
    op,
    classAtCells,
    bandAtCells,
    hostAtCells,
    mortalityAtCells,
    stockingAtCells,
    u0,
    stepYears,
    perCapita: perCapitaRate(g),
    hostKillRate: pest.hostKillRate,
    stiffness: reactionStiffness(g, pest.hostKillRate, 1.1 * Math.max(1, o.infestedDensity)),
    activeFloor: pulled ? windowFloor(o.detectionLevel ?? 0.01, lowRate, o.horizonYears) : 1e-15,
    pad: Math.max(4, Math.ceil((2 * movementKm) / mesh.cellKm)),
  };
}

/** The stepper of a problem, its window started around the initial infestation. */
export function problemStepper(p: LandscapeProblem): RasterStepper {
  return makeRasterStepper(
    p.op,
    {
      hostAtCells: p.hostAtCells,
      mortalityAtCells: p.mortalityAtCells,
      perCapita: p.perCapita,
      hostKillRate: p.hostKillRate,
      stiffness: p.stiffness,
      activeFloor: p.activeFloor,
      pad: p.pad,
    },
    p.u0,
  );
}
