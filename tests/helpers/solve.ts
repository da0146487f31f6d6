/**
 * Direct access to the engine's numerics for convergence studies: the same operator, steppers and split
 * time loop that analysis/run/simulate.ts wires together, on grids the tests build themselves (including
 * piecewise-uniform grids with very different cell sizes per piece).
 */
import type { Grid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator, makeDiffusionStepper, type EndCondition } from '../../server/numerics/diffusion.ts';
import { makeReactionStepper, type PerCapitaRate } from '../../server/numerics/reaction.ts';
import { makeCoupledStepper } from '../../server/numerics/coupled.ts';
import { runTimeLoop, splitStepper, type SolverResult } from '../../server/numerics/time-loop.ts';

/** A grid whose piece k spans [breaks[k], breaks[k+1]] with cells[k] equal cells. */
export function piecewiseGrid(breaks: readonly number[], cells: readonly number[]): Grid {
  const n = cells.reduce((a, b) => a + b, 0);
  const facesKm = new Float64Array(n + 1);
  const centersKm = new Float64Array(n);
  const widthsKm = new Float64Array(n);
  const segmentAtCells = new Int32Array(n);
  const firstCellOfSegment = new Int32Array(cells.length + 1);
  let i = 0;
  for (let k = 0; k < cells.length; k++) {
    firstCellOfSegment[k] = i;
    for (let j = 0; j < cells[k]; j++, i++) {
      facesKm[i] = breaks[k] + ((breaks[k + 1] - breaks[k]) * j) / cells[k];
      segmentAtCells[i] = k;
    }
  }
  firstCellOfSegment[cells.length] = n;
  facesKm[n] = breaks[cells.length];
  for (let c = 0; c < n; c++) {
    widthsKm[c] = facesKm[c + 1] - facesKm[c];
    centersKm[c] = 0.5 * (facesKm[c] + facesKm[c + 1]);
  }
  return { nCells: n, facesKm, centersKm, widthsKm, segmentAtCells, firstCellOfSegment };
}

export interface NumericsProblem {
  grid: Grid;
  /** Per piece: D, rho, host flag, mortality (non-host). */
  diffusion: readonly number[];
  residence: readonly number[];
  host: readonly boolean[];
  mortality: readonly number[];
  perCapita: PerCapitaRate;
  hostKillRate?: number;
  stiffness: number;
  ends?: { left: EndCondition; right: EndCondition };
}

/** The engine's coupled step (what runLayout uses) or the Strang-split step kept for comparison. */
export type Scheme = 'coupled' | 'split';

/** Runs a scheme from u0 (and h0 = 1) to tEnd with step dt; returns final u, h and the solver report. */
export function solve(
  p: NumericsProblem,
  u0: Float64Array,
  tEnd: number,
  dt: number,
  scheme: Scheme = 'coupled',
): { u: Float64Array; h: Float64Array; result: SolverResult } {
  const n = p.grid.nCells;
  const seg = p.grid.segmentAtCells;
  const D = Float64Array.from({ length: n }, (_, i) => p.diffusion[seg[i]]);
  const rho = Float64Array.from({ length: n }, (_, i) => p.residence[seg[i]]);
  const host = Uint8Array.from({ length: n }, (_, i) => (p.host[seg[i]] ? 1 : 0));
  const mort = Float64Array.from({ length: n }, (_, i) => p.mortality[seg[i]]);
  const op = makeDiffusionOperator(p.grid, D, rho, p.ends);
  const coeffs = { hostAtCells: host, mortalityAtCells: mort, perCapita: p.perCapita, hostKillRate: p.hostKillRate ?? 0, stiffness: p.stiffness };
  const stepper = scheme === 'coupled' ? makeCoupledStepper(op, coeffs) : splitStepper(makeDiffusionStepper(op), makeReactionStepper(coeffs));
  const u = Float64Array.from(u0);
  const h = new Float64Array(n).fill(1);
  const result = runTimeLoop(stepper, u, h, { tEnd, dt });
  return { u, h, result };
}

/** Cell averages of f by composite Simpson quadrature (m panels per cell, m even). */
export function cellAverages(grid: Grid, f: (x: number) => number, m = 8): Float64Array {
  const out = new Float64Array(grid.nCells);
  for (let i = 0; i < grid.nCells; i++) {
    const a = grid.facesKm[i];
    const b = grid.facesKm[i + 1];
    let s = 0;
    for (let j = 0; j <= m; j++) s += (j === 0 || j === m ? 1 : j % 2 ? 4 : 2) * f(a + ((b - a) * j) / m);
    out[i] = s / (3 * m);
  }
  return out;
}

/** Largest |a_i − b_i|. */
export function maxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let e = 0;
  for (let i = 0; i < a.length; i++) e = Math.max(e, Math.abs(a[i] - b[i]));
  return e;
}

/** Σ |a_i − b_i| w_i (discrete L1 norm with the cell widths). */
export function l1Diff(a: ArrayLike<number>, b: ArrayLike<number>, widths: ArrayLike<number>): number {
  let e = 0;
  for (let i = 0; i < a.length; i++) e += Math.abs(a[i] - b[i]) * widths[i];
  return e;
}
