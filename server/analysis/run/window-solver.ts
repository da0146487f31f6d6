/**
 * A computational window around a clearing: a stretch of a layout (a variant of the problem with reflecting
 * cuts) with its stepper, started from any state remapped onto its cells (the mesh's remap).
 */
import type { DiffusionOperator } from '../../numerics/diffusion.ts';
import { type FieldState, type FieldStepper, type Observer } from '../../numerics/time-loop.ts';
import type { TransectMesh } from '../../domain/transect-mesh.ts';
import type { PointScenario } from '../../model/scenario.ts';
import { asProblem, deriveProblem, type Problem } from '../../problem/problem.ts';
import { discretise, type Resolution, type TransectProblem } from '../../problem/discretise.ts';
import type { Piece } from '../../problem/layout.ts';
import { makeEngineStepper } from './simulate.ts';

import { SAME_KM } from '../../problem/geometry.ts';
import { establishedLevels } from './watches.ts';

/** A discretised stretch of the layout with its steppers, ready to run from any state. */
export interface WindowSolver {
  scenario: PointScenario;
  problem: TransectProblem;
  op: DiffusionOperator;
  /** The engine's coupled step (the same as full-transect runs use). */
  stepper: FieldStepper;
  windowKm: [number, number];
  /** Density at which each cell counts as established (Infinity off host); per cell. */
  establishedAtCells: Float64Array;
}

/** The layout restricted to [lo, hi] (pieces clipped). */
export function slicePieces(pieces: Piece[], lo: number, hi: number): Piece[] {
  const out: Piece[] = [];
  for (const p of pieces) {
    const a = Math.max(p.fromKm, lo);
    const b = Math.min(p.toKm, hi);
    if (b - a > SAME_KM) out.push({ ...p, fromKm: a, toKm: b });
  }
  return out;
}

/**
 * Builds a solver on [lo, hi] of a layout. Cut ends are reflecting (no flux); where the window reaches a
 * transect end, that end's own condition applies. `resolution` should be the full layout's, so that window
 * and full runs use the same cells and step; `horizonYears` is only used for the step-count limit.
 */
export function makeWindowSolver(
  base: PointScenario | Problem,
  pieces: Piece[],
  windowKm: [number, number],
  resolution: Resolution,
  horizonYears: number,
): WindowSolver {
  const p = asProblem(base);
  const [start, end] = p.extentKm;
  const lo = Math.max(windowKm[0], start);
  const hi = Math.min(windowKm[1], end);
  const sliced = slicePieces(pieces, lo, hi);
  const ends = {
    left: lo <= start + SAME_KM ? p.ends.left : ('reflecting' as const),
    right: hi >= end - SAME_KM ? p.ends.right : ('reflecting' as const),
  };
  // The window is a variant of the problem: its own ends and run length, the same everything else.
  const windowProblem = deriveProblem(p, { extentKm: [lo, hi], ends, horizonYears });
  const problem = discretise(windowProblem, sliced, resolution);
  const { op, stepper } = makeEngineStepper(problem);
  const establishedAtCells = establishedLevels(p.scenario, problem);
  return { scenario: p.scenario, problem, op, stepper, windowKm: [lo, hi], establishedAtCells };
}

/** A state to start a window run from: fields on some mesh at an absolute time [yr]. */
export interface StartState {
  mesh: TransectMesh;
  u: Float64Array;
  h: Float64Array;
  /** Years since the start of the scenario. */
  t: number;
}

/**
 * Initial fields of a window run: remapped density; host fraction remapped but never above the
 * window cell's own stocking (the clearing has none).
 */
export function initialFields(solver: WindowSolver, start: StartState): { u: Float64Array; h: Float64Array } {
  const { grid, mesh, stockingAtCells, hostAtCells } = solver.problem;
  const u = mesh.remap(start.u, start.mesh);
  const hr = mesh.remap(start.h, start.mesh);
  const h = new Float64Array(grid.nCells);
  for (let i = 0; i < grid.nCells; i++) h[i] = hostAtCells[i] ? Math.min(hr[i], stockingAtCells[i]) : 0;
  return { u, h };
}

/** An observer that sees absolute time (run time + offset). */
export function withOffset(o: Observer, offset: number): Observer {
  const shift = (s: FieldState): FieldState => {
    const at = s.densityAt;
    const all = s.stateAt;
    return {
      t: s.t + offset,
      tPrevious: s.tPrevious + offset,
      u: s.u,
      h: s.h,
      ...(at ? { densityAt: (cell: number, t: number) => at(cell, t - offset) } : {}),
      ...(all ? { stateAt: (t: number, u: Float64Array, h: Float64Array) => all(t - offset, u, h) } : {}),
    };
  };
  return {
    initialize: o.initialize ? (s) => o.initialize!(shift(s)) : undefined,
    handle: (s) => o.handle(shift(s)),
    finalize: o.finalize ? (s) => o.finalize!(shift(s)) : undefined,
  };
}
