/**
 * Discretisation of a layout on the transect mesh: per-cell coefficients, initial state, end conditions and
 * growth. Made once per distinct (layout, resolution, ends, start, horizon) through the problem's cache
 * (server/problem/problem.ts); the resolution policy and the engine's limits are in server/problem/resolution.ts.
 */
import { makeGrid } from '../numerics/grid.ts';
import { transectMesh } from '../domain/transect-mesh.ts';
import { habitatCoefficients } from '../model/habitat.ts';
import { lowDensityRate, perCapitaRate, reactionStiffness } from '../model/growth.ts';
import type { PointScenario } from '../model/scenario.ts';
import type { Piece } from './layout.ts';
import { asProblem, type Problem, type Resolution, type TransectProblem } from './problem.ts';
import { MIN_CELLS_PER_PIECE, checkEngineLimits, chooseResolution } from './resolution.ts';

// One round of re-exports for callers that imported the policy from here.
export { chooseResolution, MAX_CELLS, MAX_STEPS, MIN_CELLS_PER_PIECE } from './resolution.ts';
export type { Resolution, TransectProblem } from './problem.ts';
export { growthRateScale } from '../model/growth.ts';


/** Cache key of a discretisation: everything {@link makeDiscretisation} reads. */
function discretisationKey(p: Problem, pieces: readonly Piece[], r: Resolution): string {
  const layout = pieces.map((q) => `${q.fromKm},${q.toKm},${q.habitat},${q.stocking},${q.stemsPerHa},${q.segment},${q.barrier ? 1 : 0}`).join(';');
  const inf = p.infestation;
  return `${layout}|${r.cellKm},${r.stepYears},${r.autoCell ? 1 : 0}${r.autoStep ? 1 : 0}|${p.ends.left},${p.ends.right}|${inf.fromKm},${inf.toKm},${inf.density}|${p.horizonYears}`;
}

/**
 * The per-cell arrays for a layout, made once per distinct layout and resolution of a problem (the arrays
 * are shared: callers copy u0 and the stocking before stepping and never write to them).
 * @throws LimitError when the grid or the number of steps would exceed MAX_CELLS / MAX_STEPS
 */
export function discretise(problem: Problem | PointScenario, pieces: Piece[], resolution?: Resolution): TransectProblem {
  const p = asProblem(problem);
  const r = resolution ?? chooseResolution(p, pieces);
  return p.cache.discretisation(discretisationKey(p, pieces, r), () => makeDiscretisation(p, pieces, r));
}

function makeDiscretisation(p: Problem, pieces: Piece[], resolution: Resolution): TransectProblem {
  checkEngineLimits(pieces, resolution, p.horizonYears);
  const breaks = [pieces[0].fromKm, ...pieces.map((q) => q.toKm)];
  const grid = makeGrid(breaks, resolution.cellKm, MIN_CELLS_PER_PIECE);
  const n = grid.nCells;
  const diffusionAtCells = new Float64Array(n);
  const residenceAtCells = new Float64Array(n);
  const mortalityAtCells = new Float64Array(n);
  const hostAtCells = new Uint8Array(n);
  const stockingAtCells = new Float64Array(n);
  const stemsAtCells = new Float64Array(n);
  const u0 = new Float64Array(n);
  const inf = p.infestation;
  for (let i = 0; i < n; i++) {
    const piece = pieces[grid.segmentAtCells[i]];
    const c = habitatCoefficients(p.pest, piece.habitat);
    diffusionAtCells[i] = c.diffusion;
    residenceAtCells[i] = c.residence;
    mortalityAtCells[i] = c.mortality;
    hostAtCells[i] = c.host ? 1 : 0;
    stockingAtCells[i] = piece.stocking;
    stemsAtCells[i] = piece.stemsPerHa;
    if (c.host) {
      // Cell average of the initial infestation (partial overlap at the stretch's ends).
      const overlap = Math.min(grid.facesKm[i + 1], inf.toKm) - Math.max(grid.facesKm[i], inf.fromKm);
      if (overlap > 0) u0[i] = (inf.density * piece.stocking * overlap) / grid.widthsKm[i];
    }
  }
  return {
    grid,
    mesh: transectMesh(grid),
    pieces,
    resolution,
    diffusionAtCells,
    residenceAtCells,
    mortalityAtCells,
    hostAtCells,
    stockingAtCells,
    stemsAtCells,
    u0,
    ends: p.ends,
    perCapita: perCapitaRate(p.pest.growth),
    hostKillRate: p.pest.hostKillRate,
    stiffness: reactionStiffness(p.pest.growth, p.pest.hostKillRate, 1.1 * Math.max(1, inf.density)),
  };
}

/** Linear (pulled-front) speed estimate 2√(D r0) in fully stocked host forest [km/yr], 0 when r0 ≤ 0. */
export function linearSpreadSpeed(s: Pick<PointScenario, 'pest'>): number {
  const r0 = lowDensityRate(s.pest.growth, 1);
  return r0 > 0 ? 2 * Math.sqrt(s.pest.diffusionHost * r0) : 0;
}
