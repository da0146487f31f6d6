/**
 * The one resolution policy: cell size and time step of every run, and the limits on both. Every run an
 * evaluation makes (baseline, option runs, window runs, bypass runs, mosaic patterns, ensemble draws) takes
 * its resolution from here, and the web server's limit check counts cells with the same functions
 * (web/limits.ts via plannedRuns in analysis/evaluate/planned-runs.ts), so what it reports is what the run uses.
 */
import { habitatCoefficients } from '../model/habitat.ts';
import { growthRateScale } from '../model/growth.ts';
import { FIELDS } from '../model/fields.ts';
import { LimitError } from '../model/errors.ts';
import { countCells } from '../numerics/grid.ts';
import type { Piece, ClearingSpec } from './layout.ts';
import { layoutOf, deriveProblem, type Problem, type Resolution } from './problem.ts';

export type { Resolution } from './problem.ts';


/** Cells per shortest movement length in the automatic choice. */
const CELLS_PER_LENGTH = 10;
/** Automatic time step as a fraction of the fastest local rate's time scale 1/rate. */
const STEP_PER_RATE_TIME = 0.05;
/**
 * Automatic time step as a fraction of 1/mortality for off-host mortality. Mortality is linear and sits in
 * the L-stable implicit operator of the coupled step (numerics/coupled.ts), so it needs no stability bound
 * and gets a looser accuracy bound than the growth rates. Measured cost on the demo scenarios: arrival times
 * change by ≤ 0.02 yr against a step four times smaller (tests/problem/step-rule.test.ts); run time falls
 * 4–8× for options with a high mortality in the clearing.
 */
const STEP_PER_EXACT_RATE_TIME = 0.5;
/** Largest number of cells a run may use. */
export const MAX_CELLS = 200_000;
/** Largest number of time steps a run may take. */
export const MAX_STEPS = 2_000_000;
/** Smallest number of cells in any habitat piece (a barrier is always resolved). */
export const MIN_CELLS_PER_PIECE = 8;

/**
 * Automatic resolution (documented in DEVELOPERS.md):
 * - cell = (shortest movement length)/10, where the movement lengths are √(D_host/r) in host forest and
 *   √(D/m) in each open or non-host habitat that appears (the distance over which density changes);
 * - step = min(0.05 / (largest of the growth-rate scale and the host-kill rate), 0.5 / (largest mortality
 *   in habitats that appear)) [yr]: mortality is linear and treated implicitly (L-stable), so it is looser.
 * The problem's fixed values (a user's `numerics`, a coarsened draw's) override either choice.
 */
export function chooseResolution(p: Pick<Problem, 'pest' | 'numerics'>, pieces: readonly Piece[]): Resolution {
  const r = growthRateScale(p.pest.growth);
  const lengths: number[] = [Math.sqrt(p.pest.diffusionHost / r)];
  const rates: number[] = [r, p.pest.hostKillRate];
  const exactRates: number[] = [0];
  for (const habitat of new Set(pieces.map((q) => q.habitat))) {
    if (habitat === 'host-forest') continue;
    const c = habitatCoefficients(p.pest, habitat);
    // A habitat with little mortality still needs resolving on the growth scale.
    lengths.push(Math.sqrt(c.diffusion / Math.max(c.mortality, r)));
    exactRates.push(c.mortality);
  }
  const autoCellKm = Math.min(...lengths) / CELLS_PER_LENGTH;
  const autoStep = Math.min(STEP_PER_RATE_TIME / Math.max(...rates), STEP_PER_EXACT_RATE_TIME / Math.max(...exactRates));
  return {
    cellKm: p.numerics.cellM !== undefined ? p.numerics.cellM / 1000 : autoCellKm,
    stepYears: p.numerics.stepYears ?? autoStep,
    autoCell: p.numerics.cellM === undefined,
    autoStep: p.numerics.stepYears === undefined,
    ...(p.numerics.stepYears === undefined ? { tolerance: p.numerics.tolerance ?? DEFAULT_TOLERANCE } : {}),
  };
}

/**
 * Default relative tolerance of the adaptive integrator (absolute tolerance 1e-3 of it, in units of the
 * relative density). Chosen from the verification tables (DEVELOPERS.md, "Adaptive time integration"): at
 * 1e-5 the bench (b) profile error is at the 25 m spatial error and front speeds are within 0.01 % (pushed)
 * and 0.2 % (pulled, log-corrected) of theory.
 */
export const DEFAULT_TOLERANCE = 1e-5;

/** Cell size and step that suit the baseline and every given option layout (the finest of their choices). */
export function mergedResolution(p: Problem, options: readonly ClearingSpec[]): Resolution {
  let r = chooseResolution(p, layoutOf(p));
  for (const o of options) {
    const q = chooseResolution(p, layoutOf(p, o));
    r = { ...r, cellKm: Math.min(r.cellKm, q.cellKm), stepYears: Math.min(r.stepYears, q.stepYears) };
  }
  return r;
}

/**
 * The problem of an ensemble draw with cells `factor` times the automatic choice (the finest over the
 * baseline and every option layout, as the barrier analysis would pick) and adaptive steps at factor² times
 * the tolerance (the time error then stays below the spatial error, which grows as the cell squared); values
 * the user fixed are kept (a fixed step stays a fixed step).
 */
export function coarsenedProblem(p: Problem, factor: number): Problem {
  if (!(factor > 1)) return p;
  const options = p.scenario.barrier?.options ?? [];
  const layouts = [layoutOf(p), ...options.map((o) => layoutOf(p, o))];
  const res = layouts.map((l) => chooseResolution(p, l));
  const cellKm = Math.min(...res.map((r) => r.cellKm));
  // A step the user fixed stays fixed; otherwise the draw's steps are adaptive at a looser tolerance.
  return deriveProblem(p, {
    numerics: p.numerics.stepYears !== undefined
      ? { cellM: p.numerics.cellM ?? Math.min(FIELDS.cellM.max, factor * cellKm * 1000), stepYears: p.numerics.stepYears }
      : {
          cellM: p.numerics.cellM ?? Math.min(FIELDS.cellM.max, factor * cellKm * 1000),
          tolerance: Math.min(FIELDS.tolerance.max, (p.numerics.tolerance ?? DEFAULT_TOLERANCE) * factor * factor),
        },
  });
}

/** Cells a layout gets at a resolution (the grid's own count, without building it). */
export function cellsOf(pieces: readonly Piece[], resolution: Resolution): number {
  return countCells([pieces[0].fromKm, ...pieces.map((q) => q.toKm)], resolution.cellKm, MIN_CELLS_PER_PIECE);
}

/**
 * The engine's hard limits for one run of a layout over `years`.
 * @throws LimitError naming numerics.cellM (or horizonYears / numerics.stepYears) with the value and the limit
 */
export function checkEngineLimits(pieces: readonly Piece[], resolution: Resolution, years: number): void {
  const total = pieces[pieces.length - 1].toKm - pieces[0].fromKm;
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
  const steps = years / resolution.stepYears;
  if (steps > MAX_STEPS) {
    throw new LimitError([
      {
        path: resolution.autoStep ? 'horizonYears' : 'numerics.stepYears',
        value: resolution.autoStep ? years : resolution.stepYears,
        message: `needs ${Math.round(steps)} time steps; the limit is ${MAX_STEPS}. Shorten the horizon or use a longer step`,
      },
    ]);
  }
}
