import { makeGrid, type Grid } from '../numerics/grid.ts';
import type { EndCondition } from '../numerics/diffusion.ts';
import { habitatCoefficients } from '../model/habitat.ts';
import { lowDensityRate, perCapitaRate, reactionStiffness, type PointGrowth } from '../model/growth.ts';
import type { PointScenario } from '../model/scenario.ts';
import { LimitError } from '../model/errors.ts';
import type { Piece } from './layout.ts';

/** Cell and step sizes of a run, and whether each was chosen automatically. */
export interface Resolution {
  /** Largest cell [km]. */
  cellKm: number;
  /** Time step [yr]. */
  stepYears: number;
  autoCell: boolean;
  autoStep: boolean;
}

/** Everything the solver needs, per cell (Float64Array layout: one entry per cell, left to right). */
export interface TransectProblem {
  grid: Grid;
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

/** Cells per shortest movement length in the automatic choice. */
const CELLS_PER_LENGTH = 10;
/** Automatic time step as a fraction of the fastest local rate's time scale 1/rate. */
const STEP_PER_RATE_TIME = 0.05;
/**
 * Automatic time step as a fraction of 1/mortality for off-host mortality. Mortality is linear and sits in
 * the L-stable implicit operator of the coupled step (numerics/coupled.ts), so it needs no stability bound
 * and gets a looser accuracy bound than the growth rates. Measured cost on the demo scenarios: arrival times change by ≤ 0.02 yr against a
 * step four times smaller (tests/analysis/step-rule.test.ts); run time falls 4–8× for options with a
 * high mortality in the clearing.
 */
const STEP_PER_EXACT_RATE_TIME = 0.5;
/** Largest number of cells a run may use. */
export const MAX_CELLS = 200_000;
/** Largest number of time steps a run may take. */
export const MAX_STEPS = 2_000_000;
/** Smallest number of cells in any habitat piece (a barrier is always resolved). */
export const MIN_CELLS_PER_PIECE = 8;

/** Growth-rate scale of the pest [1/yr]: the rate parameter that sets how fast local dynamics run. */
export function growthRateScale(g: PointGrowth): number {
  switch (g.form) {
    case 'logistic':
    case 'allee-cubic':
      return g.rate;
    case 'mate-finding':
      return Math.max(g.birthRate, g.deathRate, 1e-6);
  }
}

/**
 * Automatic resolution (documented in DEVELOPERS.md):
 * - cell = (shortest movement length)/10, where the movement lengths are √(D_host/r) in host forest and
 *   √(D/m) in each open or non-host habitat that appears (the distance over which density changes);
 * - step = min(0.05 / (largest of the growth-rate scale and the host-kill rate), 0.5 / (largest mortality
 *   in habitats that appear)) [yr]: mortality is linear and treated implicitly (L-stable), so it is looser.
 * User values in `numerics` override either choice.
 */
export function chooseResolution(s: PointScenario, pieces: Piece[]): Resolution {
  const r = growthRateScale(s.pest.growth);
  const lengths: number[] = [Math.sqrt(s.pest.diffusionHost / r)];
  const rates: number[] = [r, s.pest.hostKillRate];
  const exactRates: number[] = [0];
  for (const habitat of new Set(pieces.map((p) => p.habitat))) {
    if (habitat === 'host-forest') continue;
    const c = habitatCoefficients(s.pest, habitat);
    // A habitat with little mortality still needs resolving on the growth scale.
    lengths.push(Math.sqrt(c.diffusion / Math.max(c.mortality, r)));
    exactRates.push(c.mortality);
  }
  const autoCellKm = Math.min(...lengths) / CELLS_PER_LENGTH;
  const autoStep = Math.min(STEP_PER_RATE_TIME / Math.max(...rates), STEP_PER_EXACT_RATE_TIME / Math.max(...exactRates));
  return {
    cellKm: s.numerics.cellM !== undefined ? s.numerics.cellM / 1000 : autoCellKm,
    stepYears: s.numerics.stepYears ?? autoStep,
    autoCell: s.numerics.cellM === undefined,
    autoStep: s.numerics.stepYears === undefined,
  };
}

/**
 * Builds the per-cell arrays for a layout.
 * @throws LimitError when the grid or the number of steps would exceed MAX_CELLS / MAX_STEPS
 */
export function discretise(s: PointScenario, pieces: Piece[], resolution = chooseResolution(s, pieces)): TransectProblem {
  const breaks = [pieces[0].fromKm, ...pieces.map((p) => p.toKm)];
  const total = breaks[breaks.length - 1] - breaks[0];
  const estimatedCells = total / resolution.cellKm + MIN_CELLS_PER_PIECE * pieces.length;
  if (estimatedCells > MAX_CELLS) {
    throw new LimitError([
      {
        path: 'numerics.cellM',
        value: resolution.cellKm * 1000,
        message:
          `gives about ${Math.round(estimatedCells)} cells over ${total} km; the limit is ${MAX_CELLS}. ` +
          `Use cells of at least ${Math.ceil((1000 * total) / (MAX_CELLS - MIN_CELLS_PER_PIECE * pieces.length))} m or a shorter transect`,
      },
    ]);
  }
  const steps = s.horizonYears / resolution.stepYears;
  if (steps > MAX_STEPS) {
    throw new LimitError([
      {
        path: resolution.autoStep ? 'horizonYears' : 'numerics.stepYears',
        value: resolution.autoStep ? s.horizonYears : resolution.stepYears,
        message: `needs ${Math.round(steps)} time steps; the limit is ${MAX_STEPS}. Shorten the horizon or use a longer step`,
      },
    ]);
  }
  const grid = makeGrid(breaks, resolution.cellKm, MIN_CELLS_PER_PIECE);
  const n = grid.nCells;
  const diffusionAtCells = new Float64Array(n);
  const residenceAtCells = new Float64Array(n);
  const mortalityAtCells = new Float64Array(n);
  const hostAtCells = new Uint8Array(n);
  const stockingAtCells = new Float64Array(n);
  const stemsAtCells = new Float64Array(n);
  const u0 = new Float64Array(n);
  const inf = s.infestation;
  for (let i = 0; i < n; i++) {
    const p = pieces[grid.segmentAtCells[i]];
    const c = habitatCoefficients(s.pest, p.habitat);
    diffusionAtCells[i] = c.diffusion;
    residenceAtCells[i] = c.residence;
    mortalityAtCells[i] = c.mortality;
    hostAtCells[i] = c.host ? 1 : 0;
    stockingAtCells[i] = p.stocking;
    stemsAtCells[i] = p.stemsPerHa;
    if (c.host) {
      // Cell average of the initial infestation (partial overlap at the stretch's ends).
      const overlap = Math.min(grid.facesKm[i + 1], inf.toKm) - Math.max(grid.facesKm[i], inf.fromKm);
      if (overlap > 0) u0[i] = (inf.density * p.stocking * overlap) / grid.widthsKm[i];
    }
  }
  return {
    grid,
    pieces,
    resolution,
    diffusionAtCells,
    residenceAtCells,
    mortalityAtCells,
    hostAtCells,
    stockingAtCells,
    stemsAtCells,
    u0,
    ends: s.transect.ends,
    perCapita: perCapitaRate(s.pest.growth),
    hostKillRate: s.pest.hostKillRate,
    stiffness: reactionStiffness(s.pest.growth, s.pest.hostKillRate, 1.1 * Math.max(1, inf.density)),
  };
}

/** Linear (pulled-front) speed estimate 2√(D r0) in fully stocked host forest [km/yr], 0 when r0 ≤ 0. */
export function linearSpreadSpeed(s: PointScenario): number {
  const r0 = lowDensityRate(s.pest.growth, 1);
  return r0 > 0 ? 2 * Math.sqrt(s.pest.diffusionHost * r0) : 0;
}
